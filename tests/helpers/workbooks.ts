/**
 * Small fixture builders for import tests: ordinary workbooks through SheetJS, and hand-made ZIP
 * archives (PKWARE APPNOTE layout) for the hostile files SheetJS would never write — a zip bomb, a
 * directory that lies about sizes, a sheet declaring a huge range.
 */
import { crc32, deflateRawSync } from 'node:zlib';
import * as XLSX from 'xlsx';
import { buildFloorPlanTemplate } from '../../server/floor-plans/import/index';

export type Rows = (string | number | boolean | null)[][];
export type Sheets = Record<string, Rows>;

/** Sheets → .xlsx bytes, deflated like a workbook saved by a spreadsheet program. */
export function xlsxOf(sheets: Sheets): Uint8Array {
  const wb = XLSX.utils.book_new();
  for (const [name, rows] of Object.entries(sheets)) XLSX.utils.book_append_sheet(wb, XLSX.utils.aoa_to_sheet(rows, { dense: true }), name);
  return new Uint8Array(XLSX.write(wb, { type: 'buffer', bookType: 'xlsx', compression: true }) as Buffer);
}

/** The template's four sheets as editable rows (header first), without the instructions sheet. */
export function templateSheets(): Sheets {
  const wb = XLSX.read(buildFloorPlanTemplate(), { type: 'buffer', dense: true });
  const out: Sheets = {};
  for (const name of ['aisles', 'cross_aisles', 'bins', 'depots']) {
    out[name] = XLSX.utils.sheet_to_json<Rows[number]>(wb.Sheets[name]!, { header: 1, raw: true, defval: null });
  }
  return out;
}

/** Template rows with one change applied by `edit`, as .xlsx bytes. */
export function editedTemplate(edit: (sheets: Sheets) => void): Uint8Array {
  const sheets = templateSheets();
  edit(sheets);
  return xlsxOf(sheets);
}

/** Index of a column in a sheet's header row; throws when absent so a typo fails the test. */
export function col(sheets: Sheets, sheet: string, name: string): number {
  const i = sheets[sheet]![0]!.indexOf(name);
  if (i < 0) throw new Error(`no column ${name} in ${sheet}`);
  return i;
}

export interface ZipPart {
  name: string;
  data: Uint8Array | string;
  /** 8 (deflate, default) or 0 (stored). */
  method?: 0 | 8;
  /** Write this uncompressed size into both headers instead of the true one. */
  declaredSize?: number;
  /** Set the "encrypted" flag bit. */
  encrypted?: boolean;
}

/**
 * The fields a local file header (from byte 4) and a central directory header (from byte 6) have in common,
 * in the same order (PKWARE's APPNOTE.TXT 4.3.7 and 4.3.12): version needed, flags, method, time and date
 * (left 0), CRC-32, packed and unpacked size, name length.
 */
function writeSharedHeader(
  b: Buffer,
  at: number,
  h: { flags: number; method: number; crc: number; packedSize: number; size: number; nameLength: number },
): void {
  b.writeUInt16LE(20, at);
  b.writeUInt16LE(h.flags, at + 2);
  b.writeUInt16LE(h.method, at + 4);
  b.writeUInt32LE(h.crc, at + 10);
  b.writeUInt32LE(h.packedSize, at + 14);
  b.writeUInt32LE(h.size, at + 18);
  b.writeUInt16LE(h.nameLength, at + 22);
}

/** A ZIP archive: local headers and data, then the central directory, then its end record. */
export function zipOf(parts: readonly ZipPart[]): Uint8Array {
  const chunks: Buffer[] = [];
  const central: Buffer[] = [];
  let offset = 0;
  for (const p of parts) {
    const raw = typeof p.data === 'string' ? Buffer.from(p.data, 'utf8') : Buffer.from(p.data);
    const method = p.method ?? 8;
    const packed = method === 8 ? deflateRawSync(raw, { level: 9 }) : raw;
    const name = Buffer.from(p.name, 'utf8');
    const size = p.declaredSize ?? raw.length;
    const crc = crc32(raw);
    const flags = p.encrypted ? 1 : 0;
    const shared = { flags, method, crc, packedSize: packed.length, size, nameLength: name.length };
    const local = Buffer.alloc(30);
    local.writeUInt32LE(0x04034b50, 0);
    writeSharedHeader(local, 4, shared);
    chunks.push(local, name, packed);
    const cd = Buffer.alloc(46);
    cd.writeUInt32LE(0x02014b50, 0);
    cd.writeUInt16LE(20, 4); // version made by
    writeSharedHeader(cd, 6, shared);
    cd.writeUInt32LE(offset, 42);
    central.push(cd, name);
    offset += local.length + name.length + packed.length;
  }
  const cdBytes = Buffer.concat(central);
  const end = Buffer.alloc(22);
  end.writeUInt32LE(0x06054b50, 0);
  end.writeUInt16LE(parts.length, 8);
  end.writeUInt16LE(parts.length, 10);
  end.writeUInt32LE(cdBytes.length, 12);
  end.writeUInt32LE(offset, 16);
  return new Uint8Array(Buffer.concat([...chunks, cdBytes, end]));
}

export interface RawSheet {
  name: string;
  /** Cells as [ref, value], e.g. ['A1', 'aisle']. */
  cells: [string, string | number][];
  /** The range the sheet declares in its <dimension>, e.g. "A1:XFD1048576". */
  dimension?: string;
  /** Text appended inside <sheetData> that parsers must skip (whitespace padding for a bomb). */
  padding?: string;
}

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');

function sheetXml(s: RawSheet): string {
  const byRow = new Map<number, string[]>();
  for (const [ref, v] of s.cells) {
    const r = XLSX.utils.decode_cell(ref).r + 1;
    const cell = typeof v === 'number' ? `<c r="${ref}"><v>${v}</v></c>` : `<c r="${ref}" t="inlineStr"><is><t>${esc(v)}</t></is></c>`;
    byRow.set(r, [...(byRow.get(r) ?? []), cell]);
  }
  const rows = [...byRow.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([r, cs]) => `<row r="${r}">${cs.join('')}</row>`)
    .join('');
  return `<?xml version="1.0" encoding="UTF-8" standalone="yes"?><worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main">${s.dimension ? `<dimension ref="${s.dimension}"/>` : ''}<sheetData>${rows}${s.padding ?? ''}</sheetData></worksheet>`;
}

/** A minimal valid .xlsx written by hand, as parts, so a test can tamper with any of them. */
export function rawXlsxParts(sheets: readonly RawSheet[]): ZipPart[] {
  const ct = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"><Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" ContentType="application/xml"/><Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/>${sheets.map((_, i) => `<Override PartName="/xl/worksheets/sheet${i + 1}.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/>`).join('')}</Types>`;
  const rels = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="xl/workbook.xml"/></Relationships>`;
  const wb = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?><workbook xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships"><sheets>${sheets.map((s, i) => `<sheet name="${esc(s.name)}" sheetId="${i + 1}" r:id="rId${i + 1}"/>`).join('')}</sheets></workbook>`;
  const wbRels = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">${sheets.map((_, i) => `<Relationship Id="rId${i + 1}" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/worksheet" Target="worksheets/sheet${i + 1}.xml"/>`).join('')}</Relationships>`;
  return [
    { name: '[Content_Types].xml', data: ct },
    { name: '_rels/.rels', data: rels },
    { name: 'xl/workbook.xml', data: wb },
    { name: 'xl/_rels/workbook.xml.rels', data: wbRels },
    ...sheets.map((s, i) => ({ name: `xl/worksheets/sheet${i + 1}.xml`, data: sheetXml(s) })),
  ];
}

export function rawXlsx(sheets: readonly RawSheet[]): Uint8Array {
  return zipOf(rawXlsxParts(sheets));
}

/** Sheets of rows → RawSheet cells (row 1 first). */
export function rawSheet(name: string, rows: (string | number)[][], extra: Partial<RawSheet> = {}): RawSheet {
  const cells: [string, string | number][] = [];
  rows.forEach((row, r) => row.forEach((v, c) => cells.push([XLSX.utils.encode_cell({ r, c }), v])));
  return { name, cells, ...extra };
}

/**
 * A workbook of a few KiB whose one sheet unpacks to `mib` MiB of whitespace inside <sheetData>:
 * a zip bomb in the shape of a spreadsheet.
 */
export function zipBombXlsx(mib: number, sheetName = 'aisles'): Uint8Array {
  return rawXlsx([rawSheet(sheetName, [['aisle', 'x_m', 'y_start_m', 'y_end_m']], { padding: ' '.repeat(mib * 1024 * 1024) })]);
}

/** Bytes of a CSV file (UTF-8). */
export function csvOf(lines: string[]): Uint8Array {
  return new Uint8Array(Buffer.from(lines.join('\r\n') + '\r\n', 'utf8'));
}
