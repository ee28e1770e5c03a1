import vm from "node:vm";
import { afterEach, describe, expect, it } from "vitest";
import { floorUrl, openingFetchScript, openingScrollTime, openingWeek, takeOpeningFetch } from "@/components/floor/opening-week";

// The floor's opening week and the early request for it: the week is the shop's, whatever zone
// the browser is in, and the inline script must ask for exactly the address the board will ask
// for, for any shop zone, in any browser zone and on any day of the week.

// America/Santiago: clocks go from 00:00 to 01:00 on the first Sunday of September, so that
// week starts at 01:00 (FullCalendar, through Luxon, moves a missing wall time on by the gap).
const ZONES = ["UTC", "America/Chicago", "America/Detroit", "Europe/Berlin", "Asia/Kolkata", "Pacific/Auckland", "America/Santiago"];
const BROWSER_ZONES = ["UTC", "Asia/Tokyo", "America/Los_Angeles"];
const DAYS = ["2026-09-06T12:00:00Z", "2026-09-05T23:30:00Z", "2026-03-08T07:30:00Z", "2026-03-29T00:30:00Z", "2026-11-01T06:59:00Z", "2026-12-02T15:00:00Z", "2026-12-05T23:59:00Z", "2027-01-03T00:00:00Z"];

const originalTz = process.env.TZ;
afterEach(() => {
  process.env.TZ = originalTz;
  delete (globalThis as Record<string, unknown>).__hearthFloorOpening;
});

/** Runs the inline script with a fixed clock and a recording fetch; returns the address it asked for. */
function runScript(shopZone: string, now: string): { url: string; credentials: string } {
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
  vm.runInNewContext(openingFetchScript(shopZone), { window, fetch, Date: FixedDate, encodeURIComponent });
  expect(calls).toHaveLength(1);
  expect((window.__hearthFloorOpening as { url: string }).url).toBe(calls[0].url);
  return calls[0];
}

describe("the opening week", () => {
  it("runs Sunday 00:00 to the next Sunday 00:00 in the shop's zone (FullCalendar's week view, firstDay 0), not the browser's", () => {
    for (const browser of BROWSER_ZONES) {
      process.env.TZ = browser;
      const w = openingWeek("Europe/Berlin", new Date("2026-12-02T15:00:00Z")); // a Wednesday
      expect(w).toEqual({ from: "2026-11-28T23:00:00.000Z", to: "2026-12-05T23:00:00.000Z" });
      // across the end of daylight saving time the week is 7 days and one hour long
      const dst = openingWeek("America/Chicago", new Date("2026-11-03T12:00:00Z"));
      expect(dst).toEqual({ from: "2026-11-01T05:00:00.000Z", to: "2026-11-08T06:00:00.000Z" });
      // Saturday 23:30 in Detroit is already Sunday in UTC and Tokyo: still the week before
      const late = openingWeek("America/Detroit", new Date("2026-12-06T04:30:00Z"));
      expect(late).toEqual({ from: "2026-11-29T05:00:00.000Z", to: "2026-12-06T05:00:00.000Z" });
      // the Sunday that has no midnight in Santiago begins at 01:00 (UTC−3)
      const gap = openingWeek("America/Santiago", new Date("2026-09-06T12:00:00Z"));
      expect(gap.from).toBe("2026-09-06T04:00:00.000Z");
    }
  });

  it("the inline script asks for the address the board asks for, for every shop zone, in every browser zone, on every day", () => {
    for (const browser of BROWSER_ZONES) {
      process.env.TZ = browser;
      for (const shop of ZONES) {
        for (const day of DAYS) {
          const asked = runScript(shop, day);
          expect(asked.url, `${shop} seen from ${browser} on ${day}`).toBe(floorUrl(openingWeek(shop, new Date(day))));
          expect(asked.credentials).toBe("same-origin");
        }
      }
    }
  });

  it("the script carries the zone as a string that cannot close the script element", () => {
    const script = openingFetchScript('Bad</script><script>alert(1)</script>"');
    expect(script).not.toContain("</script>");
    expect(script).toContain("\\u003c/script>");
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

describe("where the phone's day timeline opens", () => {
  // Offsets from the IANA zone database: Kolkata UTC+05:30 all year, Chicago UTC−06:00 in
  // December (standard time), Auckland UTC+13:00 in December (daylight time).
  it("is the hour before now on the shop's clock, whatever zone the browser is in", () => {
    const at = new Date("2026-12-02T15:00:00Z");
    expect(openingScrollTime("UTC", at)).toBe("14:00:00");
    expect(openingScrollTime("Asia/Kolkata", at)).toBe("19:00:00"); // 20:30 local
    expect(openingScrollTime("America/Chicago", at)).toBe("08:00:00"); // 09:00 local
    expect(openingScrollTime("Pacific/Auckland", at)).toBe("03:00:00"); // 04:00 the next day
  });
  it("never opens before midnight", () => {
    expect(openingScrollTime("UTC", new Date("2026-12-02T00:30:00Z"))).toBe("00:00:00");
    expect(openingScrollTime("America/Chicago", new Date("2026-12-02T06:59:00Z"))).toBe("00:00:00"); // 00:59 local
  });
});
