// A line owner's permission to perch on and harvest from the line (api.md "Line permissions").
// Dates are calendar days, YYYY-MM-DD, both ends inclusive.
import { z } from 'zod';

const DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

/** True for a real calendar day written YYYY-MM-DD (2026-02-30 is not one). */
export function isCalendarDate(v: string): boolean {
  const m = DATE.exec(v);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (mo < 1 || mo > 12 || d < 1) return false;
  return d <= new Date(Date.UTC(y, mo, 0)).getUTCDate();
}

const day = (what: string) =>
  z
    .string({ error: `the ${what}, as YYYY-MM-DD` })
    .refine(isCalendarDate, { error: `the ${what} must be a real date written YYYY-MM-DD` });

export const linePermissionCreateSchema = z
  .object({
    reference: z
      .string({ error: 'the owner’s reference for this permission' })
      .trim()
      .min(1, { error: 'enter the owner’s reference for this permission' })
      .max(200, { error: 'the reference is at most 200 characters' })
      .refine((v) => !/[\u0000-\u001f\u007f]/.test(v), { error: 'the reference must not contain control characters' }),
    validFrom: day('first valid day'),
    validTo: day('last valid day'),
    conditions: z
      .string({ error: 'the conditions as text' })
      .max(4000, { error: 'the conditions are at most 4000 characters' })
      .optional()
      .default('')
      .transform((v) => v.trim()),
  })
  .strict()
  .superRefine((v, ctx) => {
    if (isCalendarDate(v.validFrom) && isCalendarDate(v.validTo) && v.validTo < v.validFrom)
      ctx.addIssue({ code: 'custom', path: ['validTo'], message: 'the last valid day must not be before the first valid day' });
  });

export type LinePermissionInput = z.input<typeof linePermissionCreateSchema>;

/** A permission as the API returns it. */
export interface LinePermissionView {
  id: string;
  lineId: string;
  reference: string;
  validFrom: string;
  validTo: string;
  conditions: string;
  /** True when today (UTC) is past validTo. */
  expired: boolean;
  /** True when today (UTC) is before validFrom. */
  notYetValid: boolean;
  documentUrl: string | null;
  documentName: string | null;
  documentContentType: string | null;
  documentBytes: number | null;
  createdAt: string;
  createdById: string;
  createdByName: string | null;
}

/** Whether a permission covers a calendar day (both ends inclusive). */
export function permissionCovers(p: { validFrom: string; validTo: string }, date: string): boolean {
  return p.validFrom <= date && date <= p.validTo;
}
