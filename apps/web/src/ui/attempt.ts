import { createSignal, type Accessor } from 'solid-js';
import { errorMessage } from '../api/errors.js';

/**
 * For screens whose actions run model operations that may refuse (typed model errors): `attempt(f)`
 * runs f and shows its refusal as `message()` instead of losing it; a success clears the message.
 */
export function createAttempt(): { message: Accessor<string>; attempt: (f: () => void) => void } {
  const [message, setMessage] = createSignal('');
  const attempt = (f: () => void) => {
    try {
      f();
      setMessage('');
    } catch (err) {
      setMessage(errorMessage(err));
    }
  };
  return { message, attempt };
}
