// Types for scripts/lib/deps.mjs.
export function staleReason(root: string): string | null;
export function ensureNodeModules(root: string): Promise<void>;
