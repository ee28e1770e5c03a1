import { AppError } from "@/lib/errors";
import { ATTACHMENT_MAX_BYTES, ATTACHMENT_TYPES, type AttachmentType } from "./schemas";

// Attachments are checked by their first bytes, not by the name or the browser's claim, so a
// renamed file is refused before anything reaches storage.

const startsWith = (bytes: Uint8Array, sig: number[], offset = 0) => sig.every((b, i) => bytes[offset + i] === b);
const ascii = (s: string) => [...s].map((c) => c.charCodeAt(0));

export function sniffAttachmentType(bytes: Uint8Array): AttachmentType | undefined {
  if (startsWith(bytes, [0xff, 0xd8, 0xff])) return "image/jpeg";
  if (startsWith(bytes, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return "image/png";
  if (startsWith(bytes, ascii("RIFF")) && startsWith(bytes, ascii("WEBP"), 8)) return "image/webp";
  if (startsWith(bytes, ascii("%PDF-"))) return "application/pdf";
  return undefined;
}

/** 415 unless the declared type is one we keep: checked before the body is read. */
export function acceptedAttachmentType(declaredType: string, filename: string): AttachmentType {
  const declared = declaredType.split(";")[0].trim().toLowerCase();
  if (!(ATTACHMENT_TYPES as readonly string[]).includes(declared)) {
    throw new AppError("unsupported_media_type", `Attach photos (JPEG, PNG, WebP) or PDF reports; ${filename} is ${declared || "of no stated type"}.`, { file: ["not a photo or PDF"] });
  }
  return declared as AttachmentType;
}

/**
 * The stored type of an upload from its size and first bytes (a streamed upload keeps no more),
 * or the right error: 413 too large, 415 not a kind we keep, 422 empty or contents not what the
 * type says.
 */
export function checkAttachmentHead(head: Uint8Array, size: number, declaredType: string, filename: string): AttachmentType {
  if (size === 0) throw new AppError("invalid", `${filename} is empty.`, { file: ["the file is empty"] });
  if (size > ATTACHMENT_MAX_BYTES) {
    throw new AppError("payload_too_large", `${filename} is larger than ${ATTACHMENT_MAX_BYTES / 1024 / 1024} MB.`, { file: ["too large"] });
  }
  const declared = acceptedAttachmentType(declaredType, filename);
  if (sniffAttachmentType(head) !== declared) {
    throw new AppError("invalid", `${filename} does not contain what its type says (${declared}); nothing was stored.`, { file: ["contents do not match the file type"] });
  }
  return declared;
}

/** The same for an upload held whole in memory. */
export function checkAttachment(bytes: Uint8Array, declaredType: string, filename: string): AttachmentType {
  return checkAttachmentHead(bytes, bytes.byteLength, declaredType, filename);
}

/** A name safe for an object key and a Content-Disposition header. */
export const safeFilename = (name: string) =>
  (name.normalize("NFKD").replace(/[^\w.-]+/g, "_").replace(/^[._]+/, "").slice(0, 120) || "attachment");
