import nodemailer, { type Transporter } from "nodemailer";
import { getEnv } from "@/lib/env";

let transport: Transporter | undefined;

export function getMailTransport(): Transporter {
  if (!transport) {
    const env = getEnv();
    transport = nodemailer.createTransport({
      host: env.SMTP_HOST,
      port: env.SMTP_PORT,
      secure: env.SMTP_SECURE === "true",
      // A few kept-open connections: the worker sends in bursts (a furnace run, a sweep after an outage).
      pool: true,
      maxConnections: 3,
      maxMessages: 200,
      auth: env.SMTP_USER ? { user: env.SMTP_USER, pass: env.SMTP_PASS ?? "" } : undefined,
      // the local capture server has no certificate; a real relay sets SMTP_SECURE
      ignoreTLS: env.SMTP_SECURE !== "true" && !env.SMTP_USER,
      connectionTimeout: 5_000,
      greetingTimeout: 5_000,
      socketTimeout: 10_000,
    });
  }
  return transport;
}

/** Opens and closes an SMTP connection to see that the relay answers. */
export async function checkSmtp(): Promise<void> {
  await getMailTransport().verify();
}
