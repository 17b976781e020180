import { z } from 'zod';

/** A picker of the site with a live session right now, and the trip they hold (if any). */
export const SignedInPicker = z.object({
  id: z.number().int(),
  name: z.string(),
  badge: z.string().nullable(),
  /** When their newest live session began (ISO). */
  signedInAt: z.string(),
  tripId: z.number().int().nullable(),
  tripN: z.number().int().nullable(),
  waveId: z.number().int().nullable(),
});
export type SignedInPicker = z.infer<typeof SignedInPicker>;

export const AutoAssignResult = z.object({
  assigned: z.array(z.object({ tripId: z.number().int(), n: z.number().int(), pickerId: z.number().int(), pickerName: z.string() })),
  /** Trips of the wave still waiting for a picker after this call. */
  waiting: z.number().int(),
  /** Why nothing (or not everything) was assigned, in words; null when every waiting trip got a picker. */
  note: z.string().nullable(),
});
export type AutoAssignResult = z.infer<typeof AutoAssignResult>;
