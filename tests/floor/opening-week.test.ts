import vm from "node:vm";
import { afterEach, describe, expect, it } from "vitest";
import { OPENING_FETCH_SCRIPT, floorUrl, openingWeek, takeOpeningFetch } from "@/components/floor/opening-week";

// The floor's opening week and the early request for it: the inline script must ask for exactly
// the address the board will ask for, in any time zone and on any day of the week.

const ZONES = ["UTC", "America/Chicago", "Europe/Berlin", "Asia/Kolkata", "Pacific/Auckland"];
const DAYS = ["2026-03-08T07:30:00Z", "2026-03-29T00:30:00Z", "2026-11-01T06:59:00Z", "2026-12-02T15:00:00Z", "2026-12-05T23:59:00Z", "2027-01-03T00:00:00Z"];

const originalTz = process.env.TZ;
afterEach(() => {
  process.env.TZ = originalTz;
  delete (globalThis as Record<string, unknown>).__hearthFloorOpening;
});

/** Runs the inline script with a fixed clock and a recording fetch; returns the address it asked for. */
function runScript(now: string): { url: string; credentials: string } {
  const calls: { url: string; credentials: string }[] = [];
  const RealDate = Date;
  const fixed = new RealDate(now).getTime();
  class FixedDate extends RealDate {
    constructor(...args: unknown[]) {
      if (args.length === 0) super(fixed);
      else super(...(args as [number]));
    }
    static now() {
      return fixed;
    }
  }
  const window: Record<string, unknown> = {};
  const fetch = (url: string, init: { credentials: string }) => {
    calls.push({ url, credentials: init.credentials });
    return Promise.resolve({ ok: true, json: () => Promise.resolve({ events: [] }) });
  };
  vm.runInNewContext(OPENING_FETCH_SCRIPT, { window, fetch, Date: FixedDate, encodeURIComponent });
  expect(calls).toHaveLength(1);
  expect((window.__hearthFloorOpening as { url: string }).url).toBe(calls[0].url);
  return calls[0];
}

describe("the opening week", () => {
  it("runs Sunday 00:00 to the next Sunday 00:00 in browser time (FullCalendar's week view, firstDay 0)", () => {
    process.env.TZ = "Europe/Berlin";
    const w = openingWeek(new Date("2026-12-02T15:00:00Z")); // a Wednesday
    expect(w).toEqual({ from: "2026-11-28T23:00:00.000Z", to: "2026-12-05T23:00:00.000Z" });
    // across the end of daylight saving time the week is 7 days and one hour long
    process.env.TZ = "America/Chicago";
    const dst = openingWeek(new Date("2026-11-03T12:00:00Z"));
    expect(dst).toEqual({ from: "2026-11-01T05:00:00.000Z", to: "2026-11-08T06:00:00.000Z" });
  });

  it("the inline script asks for the address the board asks for, in every zone and on every day", () => {
    for (const tz of ZONES) {
      process.env.TZ = tz;
      for (const day of DAYS) {
        const asked = runScript(day);
        expect(asked.url, `${tz} ${day}`).toBe(floorUrl(openingWeek(new Date(day))));
        expect(asked.credentials).toBe("same-origin");
      }
    }
  });
});

describe("takeOpeningFetch", () => {
  const url = floorUrl({ from: "2026-11-29T00:00:00.000Z", to: "2026-12-06T00:00:00.000Z" });
  const put = (value: unknown) => ((globalThis as Record<string, unknown>).window = globalThis, ((globalThis as Record<string, unknown>).__hearthFloorOpening = value));

  afterEach(() => {
    delete (globalThis as Record<string, unknown>).window;
  });

  it("hands the early answer over once, for its own address, while fresh", async () => {
    put({ url, at: 1_000, data: Promise.resolve({ events: [1] }) });
    expect(takeOpeningFetch(floorUrl({ from: "2026-12-06T00:00:00.000Z", to: "2026-12-13T00:00:00.000Z" }), 2_000)).toBeNull();
    put({ url, at: 1_000, data: Promise.resolve({ events: [1] }) });
    expect(takeOpeningFetch(url, 1_000 + 10_001)).toBeNull();
    put({ url, at: 1_000, data: Promise.resolve({ events: [1] }) });
    expect(await takeOpeningFetch(url, 2_000)).toEqual({ events: [1] });
    expect(takeOpeningFetch(url, 2_000)).toBeNull();
  });

  it("is nothing on the server", () => {
    expect(takeOpeningFetch(url)).toBeNull();
  });
});
