import { mkdtempSync, rmSync } from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import nodemailer from "nodemailer";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startMailCapture } from "../../scripts/fakes/mail-capture";

// The local SMTP capture server outlives senders that die mid-session: a worker killed while
// sending resets its connections (ECONNRESET), and smtp-server reports that on the server.

const freePort = () =>
  new Promise<number>((resolve) => {
    const s = net.createServer().listen(0, "127.0.0.1", () => {
      const port = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(port));
    });
  });

let dir = "";
let smtpPort = 0;
let apiPort = 0;
let capture: Awaited<ReturnType<typeof startMailCapture>>;

beforeAll(async () => {
  dir = mkdtempSync(path.join(os.tmpdir(), "hearth-capture-"));
  smtpPort = await freePort();
  apiPort = await freePort();
  capture = await startMailCapture({ smtpPort, apiPort, dir });
});

afterAll(async () => {
  await capture.close();
  rmSync(dir, { recursive: true, force: true });
});

/** Opens an SMTP session, starts a message and resets the connection (TCP RST) in the middle. */
function resetMidMessage(): Promise<void> {
  return new Promise((resolve, reject) => {
    const socket = net.connect(smtpPort, "127.0.0.1");
    let step = 0;
    const script = ["EHLO killed.test\r\n", "MAIL FROM:<a@killed.test>\r\n", "RCPT TO:<b@killed.test>\r\n", "DATA\r\n", "Subject: half\r\n\r\nhalf a mess"];
    socket.on("data", () => {
      if (step < script.length) socket.write(script[step++]);
      if (step === script.length) {
        step++;
        setTimeout(() => {
          socket.resetAndDestroy();
          resolve();
        }, 20);
      }
    });
    socket.on("error", reject);
  });
}

describe("mail capture", () => {
  it("keeps serving after senders reset their connections mid-message", async () => {
    for (let i = 0; i < 3; i++) await resetMidMessage();
    await new Promise((r) => setTimeout(r, 100));
    const transport = nodemailer.createTransport({ host: "127.0.0.1", port: smtpPort, secure: false, ignoreTLS: true });
    await transport.sendMail({ from: "hearth@demo.hearth.test", to: "machinist@demo.hearth.test", subject: "after the resets", text: "still here" });
    const list = (await (await fetch(`http://127.0.0.1:${apiPort}/messages`)).json()).messages as { subject: string }[];
    expect(list.map((m) => m.subject)).toEqual(["after the resets"]);
  });
});
