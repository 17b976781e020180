import { describe, expect, it } from 'vitest';
import { safeFileName, sendAttachment } from '../../../server/http/attachment';
import { pathId } from '../../../server/http/path-id';
import { AppError } from '../../../server/http/errors';

describe('download file names', () => {
  it('keeps plain names as they are', () => {
    expect(safeFileName('wave-report-W12_2026-12-05.xlsx')).toBe('wave-report-W12_2026-12-05.xlsx');
  });

  it('cannot end the header or start a formula (OWASP, "CSV Injection")', () => {
    expect(safeFileName('a"; b\r\nX-Evil: 1.csv')).toBe('a___b__X-Evil__1.csv');
    expect(safeFileName('=HYPERLINK(1).csv')).toBe('_HYPERLINK_1_.csv');
    for (const lead of ['+', '-', '@', '.']) expect(safeFileName(`${lead}x.csv`).startsWith('_')).toBe(true);
    expect(safeFileName('Entrepôt Nord.xlsx')).toBe('Entrep_t_Nord.xlsx');
    expect(safeFileName('')).toBe('download');
  });

  it('sends the type, the attachment header and no-store', () => {
    const headers: Record<string, string> = {};
    let sent: unknown;
    const res = { setHeader: (k: string, v: string) => (headers[k] = v), send: (b: unknown) => (sent = b) };
    expect(sendAttachment(res as never, 'a,b', 'text/csv', 'x y.csv')).toBeUndefined();
    expect(headers).toEqual({ 'Content-Type': 'text/csv', 'Content-Disposition': 'attachment; filename="x_y.csv"', 'Cache-Control': 'no-store' });
    expect(sent).toBe('a,b');
  });
});

describe('path ids', () => {
  it('reads plain positive whole numbers', () => {
    expect(pathId('1', 'Wave')).toBe(1);
    expect(pathId('9007199254740991', 'Wave')).toBe(Number.MAX_SAFE_INTEGER);
    expect(pathId('0', 'Attachment', 0)).toBe(0);
  });

  it('answers anything else as an unknown id: 404 not_found naming the thing', () => {
    for (const bad of ['0', '-1', '1.5', '1e3', '0x10', ' 7', 'abc', '', '9007199254740993', undefined]) {
      let err: unknown;
      try {
        pathId(bad, 'Wave');
      } catch (e) {
        err = e;
      }
      expect(err, String(bad)).toBeInstanceOf(AppError);
      expect(err).toMatchObject({ kind: 'not_found', code: 'not_found', message: 'Wave not found' });
    }
  });
});
