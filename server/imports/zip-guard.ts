/**
 * Judges an .xlsx archive from its ZIP central directory before any parser inflates it, and later
 * (inside the parsing worker) checks that each entry really unpacks to no more than it declared.
 * Structure as in PKWARE's APPNOTE.TXT, sections 4.3.6 (local file header), 4.3.12 (central directory
 * file header) and 4.3.16 (end of central directory record).
 */
import { inflateRawSync } from 'node:zlib';
import type { ImportLimits } from './limits';

/** The three ZIP records read here: each one's signature and the length of its fixed part. */
const LOCAL = { signature: 0x04034b50, length: 30 } as const;
const CENTRAL = { signature: 0x02014b50, length: 46 } as const;
const END = { signature: 0x06054b50, length: 22 } as const;
const MAX_COMMENT = 0xffff;

export interface ZipEntry {
  name: string;
  /** 0 stored, 8 deflated; nothing else is accepted. */
  method: number;
  compressedSize: number;
  uncompressedSize: number;
  localHeaderOffset: number;
}

export type ZipInspection = { ok: true; entries: ZipEntry[]; uncompressedBytes: number } | { ok: false; message: string };

/** True when the bytes start like a ZIP archive (local file header signature "PK\3\4"). */
export function looksLikeZip(bytes: Uint8Array): boolean {
  return bytes.length >= 4 && bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 0x03 && bytes[3] === 0x04;
}

/**
 * Reads the end-of-central-directory record and every central directory header, and refuses an
 * archive that is malformed, split, encrypted, ZIP64, uses a method other than stored/deflate, has
 * more entries than allowed, or declares more unpacked bytes or a higher ratio than allowed.
 * O(entries); never inflates anything.
 */
export function inspectZip(
  bytes: Uint8Array,
  limits: Pick<ImportLimits, 'maxZipEntries' | 'maxUncompressedBytes' | 'maxCompressionRatio' | 'ratioFloorBytes'>,
): ZipInspection {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const fail = (message: string): ZipInspection => ({ ok: false, message });

  let end = -1;
  const lowest = Math.max(0, bytes.length - END.length - MAX_COMMENT);
  for (let i = bytes.length - END.length; i >= lowest; i--) {
    if (view.getUint32(i, true) === END.signature && i + END.length + view.getUint16(i + 20, true) <= bytes.length) {
      end = i;
      break;
    }
  }
  if (end < 0) return fail('the file is not a complete ZIP archive (no end of central directory)');

  const disk = view.getUint16(end + 4, true);
  const cdDisk = view.getUint16(end + 6, true);
  const entriesHere = view.getUint16(end + 8, true);
  const entryCount = view.getUint16(end + 10, true);
  const cdSize = view.getUint32(end + 12, true);
  const cdOffset = view.getUint32(end + 16, true);
  if (disk !== 0 || cdDisk !== 0 || entriesHere !== entryCount) return fail('split (multi-part) ZIP archives are not accepted');
  if (entryCount === 0xffff || cdSize === 0xffffffff || cdOffset === 0xffffffff) return fail('ZIP64 archives are not accepted');
  if (entryCount > limits.maxZipEntries) return fail(`the archive holds ${entryCount} files; at most ${limits.maxZipEntries} are accepted`);
  if (cdOffset + cdSize > end) return fail('the ZIP central directory lies outside the file');

  const entries: ZipEntry[] = [];
  let total = 0;
  let totalPacked = 0;
  let p = cdOffset;
  for (let k = 0; k < entryCount; k++) {
    if (p + CENTRAL.length > cdOffset + cdSize || view.getUint32(p, true) !== CENTRAL.signature) {
      return fail('the ZIP central directory is damaged');
    }
    const flags = view.getUint16(p + 8, true);
    const method = view.getUint16(p + 10, true);
    const compressedSize = view.getUint32(p + 20, true);
    const uncompressedSize = view.getUint32(p + 24, true);
    const nameLen = view.getUint16(p + 28, true);
    const extraLen = view.getUint16(p + 30, true);
    const commentLen = view.getUint16(p + 32, true);
    const localHeaderOffset = view.getUint32(p + 42, true);
    const nameEnd = p + CENTRAL.length + nameLen;
    if (nameEnd > cdOffset + cdSize) return fail('the ZIP central directory is damaged');
    const name = new TextDecoder('utf-8', { fatal: false }).decode(bytes.subarray(p + CENTRAL.length, nameEnd));

    if (flags & 1) return fail('encrypted (password-protected) workbooks are not accepted');
    if (compressedSize === 0xffffffff || uncompressedSize === 0xffffffff || localHeaderOffset === 0xffffffff) {
      return fail('ZIP64 archives are not accepted');
    }
    if (method !== 0 && method !== 8) return fail(`archive entry ${name} uses compression method ${method}; only stored and deflate are accepted`);
    if (method === 0 && compressedSize !== uncompressedSize) return fail(`archive entry ${name} is stored but its sizes differ`);
    if (localHeaderOffset + LOCAL.length + compressedSize > cdOffset) return fail(`archive entry ${name} lies outside the file`);
    if (uncompressedSize >= limits.ratioFloorBytes && uncompressedSize / Math.max(compressedSize, 1) > limits.maxCompressionRatio) {
      return fail(
        `archive entry ${name} unpacks ${Math.round(uncompressedSize / Math.max(compressedSize, 1))} times its packed size; at most ${limits.maxCompressionRatio} is accepted`,
      );
    }
    total += uncompressedSize;
    totalPacked += compressedSize;
    if (total > limits.maxUncompressedBytes) {
      return fail(`the archive unpacks to more than ${formatMiB(limits.maxUncompressedBytes)}`);
    }
    entries.push({ name, method, compressedSize, uncompressedSize, localHeaderOffset });
    p = nameEnd + extraLen + commentLen;
  }
  if (total >= limits.ratioFloorBytes && total / Math.max(totalPacked, 1) > limits.maxCompressionRatio) {
    return fail(`the archive unpacks ${Math.round(total / Math.max(totalPacked, 1))} times its packed size; at most ${limits.maxCompressionRatio} is accepted`);
  }
  return { ok: true, entries, uncompressedBytes: total };
}

/**
 * Inflates every entry with the output capped at its declared size, so an archive whose directory
 * lies about sizes is refused before the spreadsheet parser trusts it. Returns an error message or
 * null. O(unpacked bytes); run it in the worker, not on the server's event loop.
 */
export function verifyZipEntries(bytes: Uint8Array, entries: readonly ZipEntry[]): string | null {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (const e of entries) {
    const h = e.localHeaderOffset;
    if (h + LOCAL.length > bytes.length || view.getUint32(h, true) !== LOCAL.signature) return `archive entry ${e.name} has no local header`;
    const start = h + LOCAL.length + view.getUint16(h + 26, true) + view.getUint16(h + 28, true);
    if (start + e.compressedSize > bytes.length) return `archive entry ${e.name} lies outside the file`;
    if (e.method === 0) continue;
    let out: Buffer;
    try {
      // One byte over the declared size is enough to prove a lie.
      out = inflateRawSync(bytes.subarray(start, start + e.compressedSize), { maxOutputLength: e.uncompressedSize + 1 });
    } catch {
      return `archive entry ${e.name} is damaged or unpacks to more than it declares`;
    }
    if (out.length !== e.uncompressedSize) return `archive entry ${e.name} unpacks to ${out.length} bytes but declares ${e.uncompressedSize}`;
  }
  return null;
}

function formatMiB(bytes: number): string {
  return `${Math.round(bytes / 1024 / 1024)} MiB`;
}
