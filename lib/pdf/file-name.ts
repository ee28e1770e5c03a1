// The name a downloaded PDF is saved under, from codes a user may have typed.

/** A safe file name for Content-Disposition: ASCII letters, digits, dot, dash and underscore only. */
export function pdfFileName(...parts: string[]): string {
  const stem = parts
    .join("-")
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .replace(/[^A-Za-z0-9._-]+/g, "-")
    .replace(/-+/g, "-")
    .replace(/^[-.]+|[-.]+$/g, "")
    .slice(0, 80);
  return `${stem || "document"}.pdf`;
}
