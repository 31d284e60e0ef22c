// Types for scripts/lib/shutdown.mjs.
export function stopAndConfirm(
  stack: { stopAll(): Promise<void> },
  children: Array<{ name: string; pid: number }>,
  options?: { waitMs?: number; pollMs?: number },
): Promise<string>;
