/** Who is signed in. `undefined` while the first /api/me is in flight, `null` when signed out. */
import { createSignal } from 'solid-js';
import { api } from '../api/client.js';
import { ApiError } from '../api/errors.js';
import type { Me } from '../api/types.js';
import { forgetLocalCopies } from '../sync/forget.js';

const [me, setMe] = createSignal<Me | null | undefined>(undefined);
export { me };

export async function loadSession(): Promise<void> {
  try {
    setMe(await api.me());
  } catch (err) {
    if (err instanceof ApiError && err.status === 401) setMe(null);
    else {
      // offline with a remembered user: keep working from the offline copies
      const cached = localStorage.getItem('gloss:me');
      setMe(cached ? (JSON.parse(cached) as Me) : null);
    }
    return;
  }
  localStorage.setItem('gloss:me', JSON.stringify(me()));
}

export async function signIn(email: string, password: string): Promise<void> {
  const user = await api.signIn(email, password);
  // the session answer may not carry everything /api/me does
  const full = await api.me().catch(() => user);
  localStorage.setItem('gloss:me', JSON.stringify(full));
  setMe(full);
}

/**
 * Ends the session and forgets this person's documents on this device (offline copies, caches),
 * even if the server cannot be reached: the device is what is being cleared.
 */
export async function signOut(): Promise<void> {
  let failure: unknown = null;
  await api.signOut().catch((err: unknown) => (failure = err));
  await forgetLocalCopies();
  setMe(null);
  if (failure) throw failure;
}

/** After first run or an accepted invitation the server has signed this browser in: learn who. */
export async function sessionStarted(): Promise<void> {
  const full = await api.me();
  localStorage.setItem('gloss:me', JSON.stringify(full));
  setMe(full);
}
