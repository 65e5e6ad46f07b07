import { ImportError } from './import-error.js';

/** The ImportError that `fn` throws; fails the test if it returns or throws something else. */
export function errorOf(fn: () => unknown): ImportError {
  try {
    fn();
  } catch (e) {
    if (e instanceof ImportError) return e;
    throw e;
  }
  throw new Error('expected an ImportError, but the import succeeded');
}

/** The ImportError that `p` rejects with; fails the test if it resolves or rejects with something else. */
export async function refusalOf(p: Promise<unknown>): Promise<ImportError> {
  return p.then(
    () => {
      throw new Error('expected an ImportError, but the import succeeded');
    },
    (e: unknown) => {
      if (e instanceof ImportError) return e;
      throw e;
    },
  );
}
