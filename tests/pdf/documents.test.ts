// The furnace-run sheet and the unit labels read back as a viewer reads them (Mozilla's pdf.js,
// pdfjs-dist): names outside Latin-1 come back exactly, because the shipped Manrope TrueType is
// embedded (FontFile2) and each glyph maps back to its character; the pages are A4 (ISO 216,
// 210 × 297 mm = 595.28 × 841.89 pt) or Letter (8.5 × 11 in = 612 × 792 pt); and each label's QR
// code, rendered to pixels by pdf.js and decoded by jsQR (the decoder the /scan page uses),
// opens that unit's page.
import jsQR from "jsqr";
import { PDFDict, PDFDocument, PDFName } from "pdf-lib";
import { describe, expect, it } from "vitest";
import { pdfFileName } from "@/lib/pdf/file-name";
import { paperQuerySchema } from "@/lib/pdf/paper";
import { runSheetPdf, unitsByTray, type RunSheetInput, type RunSheetUnit } from "@/lib/pdf/run-sheet";
import { labelGrid, unitLabelsPdf, type UnitLabel } from "@/lib/pdf/unit-labels";
import { CAUTIONS } from "@/lib/safety/cautions";
import { readPdf, renderPage, shippedFontBytes } from "../helpers/pdf-reader";

const fonts = shippedFontBytes();
const CUSTOMERS = ["Łódź Präzision", "Šťastný a syn", "İzmir Döküm", "Σίγμα Μηχανική", "Жуков и партнёры"];

function unit(i: number, customer: string): RunSheetUnit {
  return {
    id: `00000000-0000-4000-8000-${String(i).padStart(12, "0")}`, serial: `WO-7${i}-0${i}`, part_number: `P-ŁĘ-${i}`, revision: "B", part_name: `Ventilgehäuse ${i}`,
    order_code: `WO-7${i}`, customer, material_code: "17-4PH", material_name: "17-4 PH nerezová ocel", green_mass_g: i % 2 ? 118.4 + i : null, mass_g: 110 + i,
  };
}
const units = CUSTOMERS.map((c, i) => unit(i + 1, c));

function sheetInput(paper: "a4" | "letter"): RunSheetInput {
  return {
    shop_name: "Ashgrove Sinterworks", url: "http://127.0.0.1:3000/furnace-runs/x", time_zone: "UTC", printed_at: new Date("2026-12-04T10:00:00Z"), paper,
    run: { code: "FR-Ω1", state: "scheduled", notes: "Setter plates dried; Çelik setter on tray 2", starts_at: new Date("2026-12-05T06:00:00Z"), ends_at: new Date("2026-12-05T21:00:00Z"), operator: "Ayşe Yılmaz" },
    furnace: { name: "Kiln Ÿ", max_load_g: 500, tray_count: 2, tray_x_mm: 300, tray_y_mm: 250 },
    profile: { label: "174PH-std r1", name: "17-4PH standard", atmosphere: "hydrogen", peak_c: 1320, cycle_minutes: 905 },
    layout: {
      furnace: "f", profile: "p", mass_g: 0, tallest_mm: 0, area_used_fraction: 0,
      trays: [
        { index: 0, placements: [units[2], units[0]].map((u) => ({ unit: u.id, x: 0, y: 0, w: 10, d: 10, rotated: false })) },
        { index: 1, placements: [units[1], units[3]].map((u) => ({ unit: u.id, x: 0, y: 0, w: 10, d: 10, rotated: false })) },
      ],
    },
    units,
  };
}

/** Every font the document uses, from its font dictionaries: base font name and the stream that embeds it. */
async function fontsOf(bytes: Uint8Array) {
  const doc = await PDFDocument.load(bytes);
  const found: Array<{ base: string; embedded: string[] }> = [];
  for (const [, obj] of doc.context.enumerateIndirectObjects()) {
    if (!(obj instanceof PDFDict) || obj.get(PDFName.of("Type"))?.toString() !== "/FontDescriptor") continue;
    found.push({
      base: obj.get(PDFName.of("FontName"))?.toString() ?? "",
      embedded: ["FontFile", "FontFile2", "FontFile3"].filter((k) => obj.has(PDFName.of(k))),
    });
  }
  const standard = [...doc.context.enumerateIndirectObjects()].filter(
    ([, o]) => o instanceof PDFDict && o.get(PDFName.of("Subtype"))?.toString() === "/Type1" && !o.has(PDFName.of("FontDescriptor")),
  );
  return { found, standard: standard.length };
}

describe("the furnace-run sheet", () => {
  it("prints every name and unit code exactly, on A4, with the shipped font embedded", async () => {
    const bytes = await runSheetPdf(sheetInput("a4"), fonts);
    const { pages, title } = await readPdf(bytes);
    expect(title).toBe("Furnace run FR-Ω1");
    for (const p of pages) {
      expect(Math.round(p.width)).toBe(595);
      expect(Math.round(p.height)).toBe(842);
    }
    const items = pages.flatMap((p) => p.items);
    for (const c of CUSTOMERS) expect(items).toContain(c);
    for (const u of units) {
      expect(items).toContain(u.serial);
      expect(items).toContain(`${u.part_number} / B`);
    }
    expect(items).toContain("Ayşe Yılmaz");
    expect(items).toContain("Kiln Ÿ (2 trays of 300 × 250 mm)");
    expect(items).toContain("1320 °C (2408 °F)"); // 1320 × 9/5 + 32 = 2408
    expect(items).toContain("15 h 05 min");
    expect(items).toContain("Tray 1");
    expect(items).toContain("Tray 2");
    expect(items).toContain("Not placed on a tray yet");
    // 111 + 112 + 113 + 114 + 115 g against a 500 g limit
    expect(items).toContain("Load 565 g of the furnace's 500 g limit (113 %): OVER THE LIMIT");
    // The cautions are the run page's own words, and the sheet defers to NFPA 86 and the maker.
    const all = pages.map((p) => p.text).join("\n").replace(/\s+/g, " ");
    for (const c of CAUTIONS.filter((x) => x.topics.includes("furnace"))) {
      expect(items).toContain(c.title);
      expect(all).toContain(c.text);
    }
    expect(all).toContain("NFPA 86");
    expect(all).toContain("The equipment maker's instructions, local codes and licensed practice come first.");
    const f = await fontsOf(bytes);
    expect(f.standard, "no standard (WinAnsi-only) font").toBe(0);
    expect(f.found.length).toBe(2);
    for (const d of f.found) {
      expect(d.base).toMatch(/^\/Manrope-(Regular|Bold)/);
      expect(d.embedded).toEqual(["FontFile2"]);
    }
  });

  it("comes out on Letter when asked, and a character the font lacks prints as ? rather than nothing", async () => {
    const input = sheetInput("letter");
    input.units = [unit(9, "Ōsaka Seimitsu 大阪精密")];
    const { pages } = await readPdf(await runSheetPdf(input, fonts));
    expect(pages.map((p) => [p.width, p.height])).toEqual(pages.map(() => [612, 792]));
    expect(pages.flatMap((p) => p.items)).toContain("Ōsaka Seimitsu ????");
  });

  it("groups units by the tray the layout puts them on, unplaced last", () => {
    const groups = unitsByTray(sheetInput("a4").layout, units);
    expect(groups.map((g) => [g.tray, g.units.map((u) => u.serial)])).toEqual([
      [1, [units[0].serial, units[2].serial]],
      [2, [units[1].serial, units[3].serial]],
      [null, [units[4].serial]],
    ]);
  });
});

describe("unit labels", () => {
  const labels: UnitLabel[] = units.map((u) => ({ ...u, url: `https://hearth.example/units/${u.id}` }));

  it("print one label per unit with the code, part, customer and material, on Letter or A4", async () => {
    for (const [paper, w, h] of [["letter", 612, 792], ["a4", 595, 842]] as const) {
      const bytes = await unitLabelsPdf({ title: "Unit labels, build B-1", paper, printed_at: new Date(), labels }, fonts);
      const { pages } = await readPdf(bytes);
      expect(pages).toHaveLength(1);
      expect([Math.round(pages[0].width), Math.round(pages[0].height)]).toEqual([w, h]);
      const items = pages[0].items;
      for (const l of labels) {
        expect(items).toContain(l.serial);
        expect(items).toContain(l.customer);
        expect(items).toContain(`${l.part_number} / B`);
        expect(items).toContain(l.part_name);
        expect(items).toContain("17-4PH · 17-4 PH nerezová ocel");
      }
      const f = await fontsOf(bytes);
      expect(f.standard).toBe(0);
      for (const d of f.found) expect(d.embedded).toEqual(["FontFile2"]);
    }
  });

  it("print a long unit code whole, smaller or over two lines, never cut", async () => {
    const long = "WO-2401-P-1234567890-LONGPART-REV-B-0001";
    const bytes = await unitLabelsPdf({ title: "t", paper: "a4", printed_at: new Date(), labels: [{ ...labels[0], serial: long }] }, fonts);
    const { pages } = await readPdf(bytes);
    expect(pages[0].items.join("")).toContain(long);
    expect(pages[0].items.some((t) => t.includes("…"))).toBe(false);
    const input = sheetInput("a4");
    input.units = [{ ...units[0], serial: long }];
    const sheet = await readPdf(await runSheetPdf(input, fonts));
    expect(sheet.pages[0].items.join("")).toContain(long);
  });

  it("run onto a second page past 14 labels on A4 (2 × 7) and 12 on Letter (2 × 6)", async () => {
    expect(labelGrid("a4", 15).map((g) => g.page)).toEqual([...Array(14).fill(0), 1]);
    expect(labelGrid("letter", 13).map((g) => g.page)).toEqual([...Array(12).fill(0), 1]);
    const many = Array.from({ length: 15 }, (_, i) => ({ ...labels[i % labels.length], serial: `U-${i}` }));
    const { pages } = await readPdf(await unitLabelsPdf({ title: "t", paper: "a4", printed_at: new Date(), labels: many }, fonts));
    expect(pages).toHaveLength(2);
    expect(pages[1].items).toContain("U-14");
  });

  it("carry a QR code that decodes (pdf.js render, jsQR) to the unit's page", async () => {
    const bytes = await unitLabelsPdf({ title: "t", paper: "a4", printed_at: new Date(), labels }, fonts);
    const scale = 3;
    const img = await renderPage(bytes, 1, scale);
    const grid = labelGrid("a4", labels.length);
    const pageH = 841.89;
    for (let i = 0; i < labels.length; i++) {
      const g = grid[i];
      // Crop the label's left square (the QR) out of the page's pixels.
      const x0 = Math.floor(g.x * scale);
      const y0 = Math.floor((pageH - g.y - g.h) * scale);
      const side = Math.floor(g.h * scale);
      const crop = new Uint8ClampedArray(side * side * 4);
      for (let r = 0; r < side; r++) crop.set(img.data.subarray(((y0 + r) * img.width + x0) * 4, ((y0 + r) * img.width + x0 + side) * 4), r * side * 4);
      const code = jsQR(crop, side, side);
      expect(code?.data, `label ${i}`).toBe(labels[i].url);
    }
  });
});

describe("the paper parameter and the file name", () => {
  it("takes a4 or letter, defaults to A4, and refuses anything else", () => {
    expect(paperQuerySchema.parse({}).paper).toBe("a4");
    expect(paperQuerySchema.parse({ paper: "letter" }).paper).toBe("letter");
    const bad = paperQuerySchema.safeParse({ paper: "b5" });
    expect(bad.success).toBe(false);
    expect(bad.error?.issues[0].path).toEqual(["paper"]);
  });

  it("makes a header-safe ASCII file name from any code", () => {
    expect(pdfFileName("unit-labels", "B-Š17", "a4")).toBe("unit-labels-B-S17-a4.pdf");
    expect(pdfFileName("unit-labels", "B-Ł17", "a4")).toBe("unit-labels-B-17-a4.pdf");
    expect(pdfFileName("furnace-run", 'FR"1\r\n;x', "letter")).toBe("furnace-run-FR-1-x-letter.pdf");
    expect(pdfFileName("ΣΣ")).toBe("document.pdf");
  });
});
