/**
 * Whether an error is a refusal of what the command asked (a duplicate email, a missing study, a file
 * that is not a transcript) rather than a fault: refusals print their message and exit 2, faults 1.
 * The admin operations throw AdminError; the HTTP-shaped layers (exchange) still carry a 4xx status.
 */
import { admin } from '@gloss/server';

export function refusal(err: unknown): string | null {
  if (err instanceof admin.AdminError) return err.message;
  const e = err as { status?: number; message?: string } | null;
  if (e && typeof e.status === 'number' && e.status < 500) return e.message ?? 'refused';
  return null;
}
