/** Binds a Yjs value to a solid signal: `read` runs again after every change deep inside `type`. */
import { createSignal, onCleanup, type Accessor } from 'solid-js';
import type * as Y from 'yjs';

export function useY<T>(type: Y.AbstractType<any>, read: () => T): Accessor<T> {
  const [value, setValue] = createSignal<T>(read(), { equals: false });
  const on = () => setValue(() => read());
  type.observeDeep(on);
  onCleanup(() => type.unobserveDeep(on));
  return value;
}
