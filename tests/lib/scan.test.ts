import { describe, expect, it } from "vitest";
import { pageFor, parseScan } from "@/lib/scan/codes";
import { tallyOf } from "@/lib/scan/tally";

const ID = "0b6f3a4e-8a63-4c43-9d3b-5a1f3c2e9d10";

describe("reading a scanned or typed code", () => {
  it("takes the path of a traveler's address on any host, and nothing else from it", () => {
    expect(parseScan(`https://shop.example/builds/${ID}`)).toEqual({ kind: "page", scanKind: "build", id: ID });
    expect(parseScan(`http://127.0.0.1:3000/furnace-runs/${ID.toUpperCase()}?x=1`)).toEqual({ kind: "page", scanKind: "furnace_run", id: ID });
    expect(parseScan(`/batches/wash/${ID}`)).toEqual({ kind: "page", scanKind: "wash_batch", id: ID });
    expect(pageFor("unit", ID)).toBe(`/units/${ID}`);
  });

  it("refuses addresses that are not a record page, and text that cannot be a code", () => {
    expect(parseScan("https://evil.example/")).toBeNull();
    expect(parseScan(`https://shop.example/setup/${ID}`)).toBeNull();
    expect(parseScan("javascript:alert(1)")).toBeNull();
    expect(parseScan("   ")).toBeNull();
    expect(parseScan("a")).toBeNull();
  });

  it("normalises a typed code: spaces out, upper case", () => {
    expect(parseScan(" u-17 4ph-0003 ")).toEqual({ kind: "code", code: "U-174PH-0003" });
  });
});

describe("the load tally", () => {
  it("counts expected, loaded, missing, unexpected and refused codes, a repeat scan once", () => {
    const t = tallyOf(
      ["A", "B", "C"],
      ["A", "B", "C", "X"],
      [
        { serial: "A", unit_id: "1", status: "loaded" },
        { serial: "A", unit_id: "1", status: "loaded" },
        { serial: "X", unit_id: "9", status: "added" },
        { serial: "Y", unit_id: "8", status: "refused", reason: "needs profile P2" },
        { serial: "B", unit_id: "2", status: "loaded" },
      ],
    );
    expect(t.loaded).toEqual(["A", "X", "B"]);
    expect(t.missing).toEqual(["C"]);
    expect(t.unexpected.map((u) => `${u.serial}:${u.status}`)).toEqual(["X:added"]);
    expect(t.refused.map((u) => `${u.serial}: ${u.reason}`)).toEqual(["Y: needs profile P2"]);
  });

  it("keeps a refused code out of the unexpected units, and a refusal later loaded out of the refused", () => {
    const t = tallyOf(
      ["A"],
      ["A", "Z"],
      [
        { serial: "NO-SUCH-1", unit_id: null, status: "refused", reason: "no record has that code" },
        { serial: "Z", unit_id: "7", status: "refused", reason: "the tray is full" },
        { serial: "Z", unit_id: "7", status: "added" },
        { serial: "B", unit_id: "3", status: "refused", reason: "not allowed" },
      ],
    );
    expect(t.unexpected.map((u) => u.serial)).toEqual(["Z"]);
    expect(t.refused.map((u) => u.serial)).toEqual(["NO-SUCH-1", "B"]);
    expect(t.missing).toEqual(["A"]);
    expect(t.loaded).toEqual(["Z"]);
  });

  it("does not count a unit taken off the run after its scan", () => {
    const t = tallyOf(["A"], [], [{ serial: "A", unit_id: "1", status: "loaded" }]);
    expect(t.loaded).toEqual([]);
    expect(t.missing).toEqual(["A"]);
  });
});
