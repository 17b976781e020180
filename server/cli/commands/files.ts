/** Input files of the workbook commands: read by path, every problem an InputError naming the flag. */
import { readFile } from 'node:fs/promises';
import { basename } from 'node:path';
import type { RowIssue } from '../../../shared/imports';
import type { NamedFile } from '../../waves/cli-inputs';
import { InputError } from './trip-input';

export async function readNamed(path: string, flag: string): Promise<NamedFile> {
  try {
    return { bytes: new Uint8Array(await readFile(path)), name: basename(path) };
  } catch (e) {
    throw new InputError(`--${flag} ${path}: ${(e as NodeJS.ErrnoException).code === 'ENOENT' ? 'no such file' : (e as Error).message}`);
  }
}

/** One row issue as a line: where (sheet, row, column), what, and the value seen. */
export const issueLine = (e: RowIssue): string => {
  const where = [e.sheet, e.row === null ? null : `row ${e.row}`, e.column].filter(Boolean).join(', ');
  return `${where}: ${e.message}${e.value === null ? '' : ` (value: ${e.value})`}`;
};
