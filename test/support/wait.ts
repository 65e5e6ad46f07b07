/** Waiting in tests without sleeping and hoping: poll a condition until it holds or a deadline passes. */

/**
 * Polls `check` every 10 ms until it is true; past `timeoutMs` throws naming `what`. Generous by
 * default: the deadline only bounds how long a failure takes to report on a busy machine.
 */
export async function waitFor(check: () => boolean | Promise<boolean>, what: string, timeoutMs = 20_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    if (await check()) return;
    if (Date.now() > deadline) throw new Error(`timed out waiting for: ${what}`);
    await new Promise((resolve) => setTimeout(resolve, 10));
  }
}
