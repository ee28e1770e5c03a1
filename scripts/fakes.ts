// npm run fakes – the local stand-ins for an SMTP relay and S3, on loopback only.
import path from "node:path";
import S3rver from "s3rver";
import { startMailCapture } from "./fakes/mail-capture";
import { startWebhookReceiver } from "./fakes/webhook-receiver";

const dataDir = process.env.HEARTH_DATA_DIR ?? path.resolve(".data");
const smtpPort = Number(process.env.SMTP_PORT ?? 2525);
const mailApiPort = Number(process.env.MAIL_CAPTURE_PORT ?? 2526);
const s3Port = Number(process.env.S3_PORT ?? 4569);
const bucket = process.env.S3_BUCKET ?? "hearth";
const webhookPort = Number(process.env.WEBHOOK_RECEIVER_PORT ?? 2527);

async function main() {
  const mail = await startMailCapture({ smtpPort, apiPort: mailApiPort, dir: path.join(dataDir, "mail") });
  const s3 = new S3rver({
    address: "127.0.0.1",
    port: s3Port,
    silent: true,
    directory: path.join(dataDir, "s3"),
    configureBuckets: [{ name: bucket, configs: [] }],
  });
  await s3.run();
  const hooks = await startWebhookReceiver({ port: webhookPort });
  console.log(`[fakes] SMTP capture on 127.0.0.1:${smtpPort} (read API :${mailApiPort}); S3 fake on 127.0.0.1:${s3Port}, bucket ${bucket}; webhook receiver on 127.0.0.1:${webhookPort}`);

  const stop = async () => {
    await mail.close();
    await s3.close();
    await hooks.close();
    process.exit(0);
  };
  process.on("SIGTERM", () => void stop());
  process.on("SIGINT", () => void stop());
}

main().catch((err) => {
  console.error("[fakes] failed to start:", err);
  process.exit(1);
});
