// Types for the parts of scripts/lib/proc.mjs that tests use.
export function createStack(): { push(name: string, stop: () => Promise<void> | void): void; stopAll(): Promise<void> };
export function isAlive(pid: number): boolean;
export function sleep(ms: number): Promise<void>;
