// Types for scripts/lib/cluster-bench.mjs.
export interface LatencyFigures {
  count: number;
  mean: number | null;
  p50: number | null;
  p95: number | null;
  p99: number | null;
  max: number | null;
}
export interface MemoryEntry {
  name: string;
  role: string;
  pids: number[];
  peakMb: number | null;
  lastMb: number | null;
}
export function latencyFigures(latenciesMs: ArrayLike<number>): LatencyFigures;
export function rssMb(pid: number, procRoot?: string): number | null;
export function createMemoryTracker(read?: (pid: number) => number | null): {
  sample(processes: Array<{ name: string; role: string; pid: number | null }>): void;
  report(): MemoryEntry[];
};
export function compareRowCounts(perNode: Record<string, Record<string, number> | null>): {
  inSync: boolean;
  tables: number;
  silent: string[];
  differences: Array<{ table: string; counts: Record<string, number | null> }>;
};
export function storageCheck(objectKeys: Iterable<string>, referencedKeys: Iterable<string>): {
  objects: number;
  referenced: number;
  orphans: string[];
  missing: string[];
};
export function sessionCheck(
  uploads: Array<{ file: string; sha256: string }>,
  sessions: Array<{ id: string; rawSha256: string; hasSummary: boolean; serverResults: number }>,
): {
  rows: Array<{ file: string; sha256: string; sessions: number; ids: string[]; serverSummary: boolean }>;
  lost: string[];
  duplicated: string[];
  withoutServerSummary: string[];
};
export function duplicatedJobs(rows: Array<{ jobId: number | string; results: number | string }>): Array<{ jobId: number; results: number }>;
export function leaseOwnerIs(owner: string | null | undefined, who: { label?: string; pid?: number }): boolean;
export function killOutright(pid: number, marker?: string): { killed: boolean; why: string };
export function table(headers: string[], rows: Array<Array<string | number | null | undefined>>): string;
export function routeTable(routes: Array<{ name: string; rps: number; figures: LatencyFigures; non2xx: number; errors: number; timeouts: number }>): string;
export function memoryTable(entries: MemoryEntry[]): string;
export function verdictLines(checks: Array<{ check: string; ok: boolean; detail?: string; gate?: boolean }>): { text: string; ok: boolean };
