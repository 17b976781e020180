import type { Response } from 'express';

export const XLSX_TYPE = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet';

/**
 * A download's file name made safe for the Content-Disposition header and for the spreadsheet program
 * that opens it: letters, digits, `_`, `.` and `-` only (anything else becomes `_`, so no quote or line
 * break can end the header), and never starting like a formula (`=`, `+`, `-`, `@`: OWASP, "CSV
 * Injection") or a hidden file.
 */
export function safeFileName(name: string): string {
  const plain = name.replace(/[^\w.-]/g, '_') || 'download';
  return /^[=+\-@.]/.test(plain) ? `_${plain}` : plain;
}

type HeaderSink = Pick<Response, 'setHeader'>;

/** The headers of a download: its type, `attachment` with the safe file name, never cached. */
export function setAttachmentHeaders(res: HeaderSink, type: string, filename: string): void {
  res.setHeader('Content-Type', type);
  res.setHeader('Content-Disposition', `attachment; filename="${safeFileName(filename)}"`);
  res.setHeader('Cache-Control', 'no-store');
}

/** Sends bytes as a download; returns undefined, as a route handler that wrote the answer itself does. */
export function sendAttachment(res: HeaderSink & Pick<Response, 'send'>, body: Buffer | string, type: string, filename: string): undefined {
  setAttachmentHeaders(res, type, filename);
  res.send(body);
  return undefined;
}
