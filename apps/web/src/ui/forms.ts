/** Small helpers the forms share: run an async action with a busy flag and the refusal in words. */
import { createSignal } from 'solid-js';
import { errorMessage } from '../api/errors.js';

export function createSubmit() {
  const [busy, setBusy] = createSignal(false);
  const [error, setError] = createSignal('');
  const run = async (f: () => Promise<void>) => {
    setBusy(true);
    setError('');
    try {
      await f();
    } catch (err) {
      setError(errorMessage(err));
    } finally {
      setBusy(false);
    }
  };
  return { busy, error, setError, run };
}

/** The whole link for a path the server gave (`/#/invite/…`), on this site's origin. */
export const fullLink = (path: string) => `${location.origin}${path}`;

/** A date-time for people, in their locale, with the exact instant kept for a tooltip. */
export function when(iso: string): string {
  return new Date(iso).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' });
}
