import { afterEach, describe, expect, it } from "vitest";
import { fromLocalInput, toLocalInput } from "@/components/batches/format";
import { formatDay, formatSlot, formatWhen } from "@/components/floor/format";

// The floor's words for times read the shop's clock, not the browser's: America/Detroit is
// UTC−5 in December (EST), Asia/Tokyo UTC+9 all year (IANA tz database).

const originalTz = process.env.TZ;
afterEach(() => {
  process.env.TZ = originalTz;
});

describe("floor times in the shop's zone", () => {
  it("a slot reads the same whatever zone the browser is in", () => {
    for (const browser of ["UTC", "Asia/Tokyo", "America/Los_Angeles"]) {
      process.env.TZ = browser;
      const slot = formatSlot("2026-12-09T14:00:00Z", "2026-12-09T16:30:00Z", "America/Detroit");
      expect(slot).toMatch(/09:00 to 11:30$/);
      expect(slot).toMatch(/Wed/);
      expect(formatWhen("2026-12-09T14:00:00Z", "Asia/Tokyo")).toMatch(/23:00/);
      // 03:00 UTC on the 10th is still the 9th in Detroit
      expect(formatDay("2026-12-10T03:00:00Z", "America/Detroit")).toMatch(/\b9\b/);
      expect(formatDay("2026-12-10T03:00:00Z", "America/Detroit")).not.toMatch(/10/);
    }
  });

  it("a slot that crosses the shop's midnight names both days; one that crosses UTC's only does not", () => {
    // 22:00–01:00 in Detroit crosses its midnight
    const overnight = formatSlot("2026-12-10T03:00:00Z", "2026-12-10T06:00:00Z", "America/Detroit");
    expect(overnight).toMatch(/22:00 to .*(Thu).*01:00$/);
    // 18:00–21:00 in Detroit is 23:00–02:00 UTC: one shop day, so the end is a time alone
    expect(formatSlot("2026-12-09T23:00:00Z", "2026-12-10T02:00:00Z", "America/Detroit")).toMatch(/18:00 to 21:00$/);
  });

  it("the booking form's start is typed and read as shop time", () => {
    process.env.TZ = "Asia/Tokyo";
    expect(toLocalInput("2026-12-10T17:00:00.000Z", "America/Detroit")).toBe("2026-12-10T12:00");
    expect(fromLocalInput("2026-12-10T12:00", "America/Detroit")).toBe("2026-12-10T17:00:00.000Z");
    expect(fromLocalInput("2026-12-10", "America/Detroit")).toBeNull();
  });
});
