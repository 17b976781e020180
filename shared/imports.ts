import { z } from 'zod';

/** One problem in an uploaded file, located as the spreadsheet numbers it (row 1 = header row). */
export const RowIssue = z.object({
  sheet: z.string(),
  /** Spreadsheet row number; null for problems of a whole sheet or file. */
  row: z.number().int().nullable(),
  column: z.string().nullable(),
  value: z.string().nullable(),
  message: z.string(),
});
export type RowIssue = z.infer<typeof RowIssue>;
