// Pure parts of the worker: the messages' content in both forms, the retry schedule, which
// SMTP failures are permanent, and the small helpers the handlers run on.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { MAIL_KINDS } from "@/lib/auth/schemas";
import { isPermanentSmtpFailure, retryDelaySeconds, backoffFromEnv } from "@/lib/mail/backoff";
import { NOTIFICATION_KINDS, NOTIFICATION_RECIPIENTS } from "@/lib/notifications/kinds";
import {
  buildMail,
  furnaceRunFinishedMail,
  readyForFinishingMail,
  washDoneMail,
  formatShopTime,
  type MailContext,
  type MailRecipient,
  type UnitLine,
} from "@/lib/notifications/templates";
import { mapLimit, shuffled } from "@/worker/limit";

const ctx: MailContext = { shop_name: "Kestrel <Sinter> & Co", time_zone: "America/Detroit", app_url: "http://hearth.test/" };
const mm: MailRecipient = { name: "Joel", email: "joel@kiln.test", unit_pref: "mm" };
const inch: MailRecipient = { name: "Marta", email: "marta@kiln.test", unit_pref: "in" };
const line = (serial: string, state: string, note: string | null = null): UnitLine => ({
  serial,
  part_number: "KS-1021",
  revision: "B",
  part_name: "bearing <carrier>",
  order_code: "WO-2402",
  state,
  note,
});
const ends = new Date("2026-12-02T17:30:00Z");

describe("messages", () => {
  it("say the same in plain text and HTML, with the link, and escape what users typed", () => {
    const m = furnaceRunFinishedMail(
      {
        id: "r1",
        code: "R-1001",
        furnace: "Kiln B",
        profile_code: "174PH-std",
        profile_name: "17-4 PH standard",
        atmosphere: "Ar / 3 % H₂",
        starts_at: new Date(ends.getTime() - 1260 * 60_000),
        ends_at: ends,
        cycle_minutes: 1260,
        units: [line("U-1", "ready_for_finishing"), line("U-2", "scrapped", "crack: found at unload")],
      },
      mm,
      ctx,
    );
    expect(m.subject).toBe("Furnace run R-1001 finished on Kiln B: 1 of 2 units ready for finishing");
    for (const body of [m.text, m.html]) {
      expect(body).toContain("R-1001");
      expect(body).toContain("21 h");
      expect(body).toContain("1 ready for finishing, 1 scrapped");
      expect(body).toContain("http://hearth.test/furnace-runs/r1");
      expect(body).toContain("NFPA 86");
    }
    expect(m.text).toContain("Hello Joel,");
    expect(m.text).toContain("bearing <carrier>");
    expect(m.html).toContain("bearing &lt;carrier&gt;");
    expect(m.html).not.toContain("<carrier>");
    expect(m.html).toContain("Kestrel &lt;Sinter&gt; &amp; Co");
    // Times in the shop's zone (Detroit is UTC−5 in December).
    expect(m.text).toContain("12:30");
  });

  it("give the machinist each part's stock per face in their own units, with notes and Ra", () => {
    const data = {
      run_id: "r1",
      run_code: "R-1001",
      furnace: "Kiln B",
      parts: [
        {
          part_number: "KS-1021",
          revision: "B",
          name: "bearing carrier",
          order_code: "WO-2402",
          due_at: ends,
          serials: ["U-1", "U-2"],
          stock: { x_neg: 0.3, x_pos: 0.3, y_neg: 0, y_pos: 0, z_neg: 0, z_pos: 0.5 },
          finishing_notes: "Grind bore to size.",
          target_ra_um: 0.8,
          tolerance_um: null,
          tolerance_grade: "IT7",
        },
      ],
    };
    const a = readyForFinishingMail(data, mm, ctx);
    const b = readyForFinishingMail(data, inch, ctx);
    expect(a.subject).toBe("Ready for finishing: 2 units of 1 part from furnace run R-1001");
    expect(a.text).toContain("X− 0.30 mm, X+ 0.30 mm, Z+ 0.50 mm");
    expect(b.text).toContain("X− 0.012 in, X+ 0.012 in, Z+ 0.020 in");
    // Target Ra (ISO 4287:1997 / ISO 21920-2:2021, ASME B46.1-2002: the mean absolute deviation
    // of the profile from its mean line) is a length: 0.8 µm = 31.496 µin (1 µin = 0.0254 µm).
    expect(a.text).toContain("0.8 µm");
    expect(b.text).toContain("31.5 µin");
    for (const body of [a.text, a.html]) {
      expect(body).toContain("Grind bore to size.");
      expect(body).toContain("IT7");
      expect(body).toContain("U-1, U-2");
      expect(body).toContain("NFPA 484");
    }
  });

  it("name a failed build and its reason, and a wash's brown and held units", () => {
    const failed = buildMail(
      { id: "b1", code: "B-7", printer: "Wren", material: "17-4PH", material_lot: "L22", starts_at: null, ends_at: ends, failed: true, failure_reason: "warped plate", units: [line("U-1", "scrapped")] },
      mm,
      ctx,
    );
    expect(failed.kind).toBe("build_failed");
    expect(failed.subject).toBe("Build B-7 failed on Wren: 1 unit scrapped");
    expect(failed.text).toContain("warped plate");
    const ok = buildMail({ id: "b1", code: "B-8", printer: null, material: "316L", material_lot: "", starts_at: null, ends_at: ends, failed: false, failure_reason: null, units: [line("U-1", "green"), line("U-2", "green")] }, mm, ctx);
    expect(ok.kind).toBe("build_finished");
    expect(ok.subject).toBe("Build B-8 finished: 2 green units");

    const wash = washDoneMail({ id: "w1", code: "W-3", station: "Wash bay 1", ends_at: ends, dried_at: ends, units: [line("U-1", "brown"), line("U-2", "on_hold", "Mass loss 2.0 % is below the 3.5 % minimum")] }, mm, ctx);
    expect(wash.subject).toBe("Wash batch W-3 done: 1 brown, 1 on hold");
    expect(wash.text).toContain("Mass loss 2.0 % is below");
    expect(wash.html).toContain("solvent");
  });

  it("fall back to UTC ISO time for an unknown zone rather than failing", () => {
    expect(formatShopTime(ends, "Mars/Olympus_Mons")).toBe(ends.toISOString());
    expect(formatShopTime(null, "UTC")).toBe("—");
  });
});

describe("kinds and recipients", () => {
  it("are the kinds users can turn off in their settings", () => {
    expect([...NOTIFICATION_KINDS].sort()).toEqual([...MAIL_KINDS].sort());
  });
  it("go to the roles the product names", () => {
    expect(NOTIFICATION_RECIPIENTS.furnace_run_finished).toEqual(["furnace_operator", "manager"]);
    expect(NOTIFICATION_RECIPIENTS.ready_for_finishing).toEqual(["machinist"]);
    expect(NOTIFICATION_RECIPIENTS.wash_done).toEqual(["furnace_operator"]);
    expect(NOTIFICATION_RECIPIENTS.build_finished).toEqual(["technician"]);
    expect(NOTIFICATION_RECIPIENTS.build_failed).toEqual(["technician"]);
  });
});

describe("retries", () => {
  it("wait base·2^(n−1), never more than the cap, and never less than the last wait", () => {
    const policy = { baseSeconds: 15, maxSeconds: 600 };
    expect([1, 2, 3, 4, 5, 6, 7, 20].map((n) => retryDelaySeconds(n, policy))).toEqual([15, 30, 60, 120, 240, 480, 600, 600]);
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 200 }), fc.double({ min: 0.1, max: 100, noNaN: true }), fc.double({ min: 1, max: 10_000, noNaN: true }), (n, base, cap) => {
        const p = { baseSeconds: base, maxSeconds: Math.max(base, cap) };
        const d = retryDelaySeconds(n, p);
        return d > 0 && d <= p.maxSeconds && retryDelaySeconds(n + 1, p) >= d;
      }),
    );
  });

  it("read their schedule from the environment, ignoring nonsense", () => {
    expect(backoffFromEnv({ HEARTH_MAIL_BACKOFF_SECONDS: "2", HEARTH_MAIL_BACKOFF_MAX_SECONDS: "8" })).toEqual({ baseSeconds: 2, maxSeconds: 8 });
    expect(backoffFromEnv({ HEARTH_MAIL_BACKOFF_SECONDS: "-1", HEARTH_MAIL_BACKOFF_MAX_SECONDS: "x" })).toEqual({ baseSeconds: 15, maxSeconds: 600 });
  });

  it("treat a relay that is down as temporary and only a rejected message or recipient as permanent", () => {
    expect(isPermanentSmtpFailure(Object.assign(new Error("connect ECONNREFUSED"), { code: "ESOCKET" }))).toBe(false);
    expect(isPermanentSmtpFailure(Object.assign(new Error("421 try later"), { code: "ECONNECTION", responseCode: 421 }))).toBe(false);
    expect(isPermanentSmtpFailure(Object.assign(new Error("554 switched off"), { code: "EPROTOCOL", responseCode: 554 }))).toBe(false);
    expect(isPermanentSmtpFailure(Object.assign(new Error("450 mailbox busy"), { code: "EENVELOPE", responseCode: 450 }))).toBe(false);
    expect(isPermanentSmtpFailure(Object.assign(new Error("550 no such user"), { code: "EENVELOPE", responseCode: 550 }))).toBe(true);
    expect(isPermanentSmtpFailure(Object.assign(new Error("552 too big"), { code: "EMESSAGE", responseCode: 552 }))).toBe(true);
    expect(isPermanentSmtpFailure(null)).toBe(false);
  });
});

describe("helpers", () => {
  it("mapLimit keeps order and never runs more than the limit at once", async () => {
    let running = 0;
    let peak = 0;
    const out = await mapLimit(Array.from({ length: 20 }, (_, i) => i), 3, async (i) => {
      running++;
      peak = Math.max(peak, running);
      await new Promise((r) => setTimeout(r, 5 + (i % 3)));
      running--;
      return i * 2;
    });
    expect(out).toEqual(Array.from({ length: 20 }, (_, i) => i * 2));
    expect(peak).toBe(3);
    expect(await mapLimit([], 4, async () => 1)).toEqual([]);
  });

  it("shuffled is a permutation", () => {
    fc.assert(fc.property(fc.array(fc.integer()), (xs) => JSON.stringify(shuffled(xs).sort()) === JSON.stringify([...xs].sort())));
  });
});
