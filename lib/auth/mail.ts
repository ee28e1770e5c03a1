import type { TokenKind } from "./tokens";

// The two account e-mails. Plain words, the link on its own line, and what to do if the
// message was not expected.

export type AccountMail = { subject: string; text: string; html: string };

const escapeHtml = (s: string) =>
  s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;").replace(/'/g, "&#39;");

export function accountMail(kind: TokenKind, opts: { name: string; shopName: string; link: string; invitedBy?: string | null }): AccountMail {
  const hours = kind === "invite" ? 48 : 1;
  const lifetime = hours === 1 ? "1 hour" : `${hours} hours`;
  const subject = kind === "invite" ? `You have a Hearth account at ${opts.shopName}` : `Set a new Hearth password`;
  const opening =
    kind === "invite"
      ? `${opts.invitedBy ? `${opts.invitedBy} has` : "An admin has"} made you a Hearth account at ${opts.shopName}. Choose your password to start:`
      : `Someone (hopefully you) asked to set a new password for your Hearth account at ${opts.shopName}. Choose it here:`;
  const closing =
    kind === "invite"
      ? `The link works once and for ${lifetime}. If it has expired, ask an admin to send a new invitation.`
      : `The link works once and for ${lifetime}. If you did not ask for it, ignore this message: your password stays as it is.`;
  const text = `Hello ${opts.name},\n\n${opening}\n\n${opts.link}\n\n${closing}\n\n— Hearth\n`;
  const html =
    `<p>Hello ${escapeHtml(opts.name)},</p>` +
    `<p>${escapeHtml(opening)}</p>` +
    `<p><a href="${escapeHtml(opts.link)}">${kind === "invite" ? "Choose my password" : "Set a new password"}</a></p>` +
    `<p style="color:#6f6557">${escapeHtml(closing)}</p>` +
    `<p>— Hearth</p>`;
  return { subject, text, html };
}
