// Waiting in tests: a pause, and polling a probe until it gives a value (or the deadline names what never came).

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Polls `probe` every `everyMs` until it returns a truthy value, which it returns; throws after `timeoutMs`. */
export async function until<T>(
  what: string,
  probe: () => Promise<T | null | undefined | false> | T | null | undefined | false,
  timeoutMs = 30_000,
  everyMs = 50,
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await sleep(everyMs);
  }
}
