/** The open-order filters the order list and the wave builder share: due before a time, priority at most. */
export interface DueFilters {
  /** Epoch milliseconds, from the date picker. */
  dueBefore: number | null;
  priorityAtMost: number | null;
}

export const PRIORITY_OPTIONS = [1, 2, 3].map((p) => ({ label: `P${p} or more urgent`, value: p }));

/** The orders query's part for these filters: only what is set. */
export function dueFilterQuery(f: DueFilters): { dueBefore?: string; priorityAtMost?: number } {
  return {
    ...(f.dueBefore ? { dueBefore: new Date(f.dueBefore).toISOString() } : {}),
    ...(f.priorityAtMost ? { priorityAtMost: f.priorityAtMost } : {}),
  };
}
