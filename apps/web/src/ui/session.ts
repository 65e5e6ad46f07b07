/** Who is signed in. `undefined` while the first /api/me is in flight, `null` when signed out. */
import { createSignal } from 'solid-js';
import { api } from '../api/client.js';
import { ApiError } from '../api/errors.js';
import type { Me } from '../api/types.js';

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

export async function signOut(): Promise<void> {
  await api.signOut();
  localStorage.removeItem('gloss:me');
  setMe(null);
}
