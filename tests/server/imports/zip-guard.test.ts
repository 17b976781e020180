import { describe, expect, it } from 'vitest';
import { DEFAULT_IMPORT_LIMITS } from '../../../server/imports/limits';
import { inspectZip, looksLikeZip, verifyZipEntries } from '../../../server/imports/zip-guard';
import { rawXlsx, rawSheet, xlsxOf, zipBombXlsx, zipOf } from '../../helpers/workbooks';

const limits = DEFAULT_IMPORT_LIMITS;
const refusal = (bytes: Uint8Array): string => {
  const r = inspectZip(bytes, limits);
  if (r.ok) throw new Error('expected a refusal');
  return r.message;
};

describe('inspectZip', () => {
  it('lists the entries of a workbook written by SheetJS with the sizes its directory declares', () => {
    const bytes = xlsxOf({ aisles: [['aisle'], ['A']] });
    const r = inspectZip(bytes, limits);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.entries.map((e) => e.name)).toContain('xl/workbook.xml');
    expect(r.uncompressedBytes).toBe(r.entries.reduce((s, e) => s + e.uncompressedSize, 0));
    expect(verifyZipEntries(bytes, r.entries)).toBeNull();
  });

  it('reads the sizes our own writer put into the central directory (PKWARE APPNOTE 4.3.12)', () => {
    const text = 'x'.repeat(5000);
    const r = inspectZip(
      zipOf([
        { name: 'a.txt', data: text },
        { name: 'b.bin', data: new Uint8Array(7), method: 0 },
      ]),
      limits,
    );
    expect(r.ok && r.entries.map((e) => [e.name, e.method, e.uncompressedSize])).toEqual([
      ['a.txt', 8, 5000],
      ['b.bin', 0, 7],
    ]);
  });

  it('refuses an archive with more than 100 entries', () => {
    const parts = Array.from({ length: 101 }, (_, i) => ({ name: `f${i}.xml`, data: '<a/>' }));
    expect(refusal(zipOf(parts))).toMatch(/101 files; at most 100/);
  });

  it('refuses a zip bomb whose sheet unpacks to more than 50 MiB, without inflating it', () => {
    const bomb = zipBombXlsx(51);
    expect(bomb.length).toBeLessThan(200 * 1024);
    expect(refusal(bomb)).toMatch(/unpacks/);
  });

  it('refuses archives whose entries declare more than 50 MiB unpacked in total, whatever the ratio', () => {
    // xorshift32 bytes barely compress, so the ratio stays near 26 and only the total can refuse them.
    let state = 2463534242;
    const noise = new Uint8Array(1024 * 1024).map(() => {
      state ^= state << 13;
      state ^= state >>> 17;
      state ^= state << 5;
      return state & 0xff;
    });
    const parts = [0, 1].map((i) => ({ name: `xl/part${i}.bin`, data: noise, declaredSize: 26 * 1024 * 1024 }));
    expect(refusal(zipOf(parts))).toMatch(/unpacks to more than 50 MiB/);
  });

  it('refuses a compression ratio over 100 even when the total stays under 50 MiB', () => {
    const bomb = zipBombXlsx(10);
    expect(refusal(bomb)).toMatch(/times its packed size; at most 100/);
  });

  it('accepts the same ratio on an entry too small to matter', () => {
    const r = inspectZip(zipOf([{ name: 'a.xml', data: ' '.repeat(100_000) }]), limits);
    expect(r.ok).toBe(true);
  });

  it('refuses encrypted entries, other compression methods and files that are not ZIP archives', () => {
    expect(refusal(zipOf([{ name: 'a.xml', data: '<a/>', encrypted: true }]))).toMatch(/encrypted/);
    const bzip = zipOf([{ name: 'a.xml', data: '<a/>', method: 0 }]);
    // Method field of the one central directory header, offset 10 (APPNOTE 4.3.12).
    const cd = bzip.length - 22 - 46 - 'a.xml'.length;
    new DataView(bzip.buffer).setUint16(cd + 10, 12, true);
    expect(refusal(bzip)).toMatch(/method 12/);
    const notZip = new TextEncoder().encode('aisle,x_m\nA,1\n');
    expect(looksLikeZip(notZip)).toBe(false);
    expect(refusal(notZip)).toMatch(/not a complete ZIP archive/);
  });

  it('refuses ZIP64 markers', () => {
    const z = zipOf([{ name: 'a.xml', data: '<a/>' }]);
    new DataView(z.buffer).setUint16(z.length - 22 + 10, 0xffff, true);
    new DataView(z.buffer).setUint16(z.length - 22 + 8, 0xffff, true);
    expect(refusal(z)).toMatch(/ZIP64/);
  });

  it('refuses a central directory that points outside the file', () => {
    const z = zipOf([{ name: 'a.xml', data: '<a/>' }]);
    new DataView(z.buffer).setUint32(z.length - 22 + 16, z.length, true);
    expect(refusal(z)).toMatch(/outside the file/);
  });
});

describe('verifyZipEntries', () => {
  it('catches an entry that unpacks to more than its directory declares', () => {
    const parts = [rawSheet('aisles', [['aisle']], { padding: ' '.repeat(3 * 1024 * 1024) })];
    const honest = rawXlsx(parts);
    expect(inspectZip(honest, limits).ok).toBe(false);
    // The same bytes declaring 1 KiB unpacked: the directory passes, inflating with a cap does not.
    const liar = zipOf([{ name: 'xl/worksheets/sheet1.xml', data: ' '.repeat(3 * 1024 * 1024), declaredSize: 1024 }]);
    const r = inspectZip(liar, limits);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(verifyZipEntries(liar, r.entries)).toMatch(/unpacks to more than it declares/);
  });
});
