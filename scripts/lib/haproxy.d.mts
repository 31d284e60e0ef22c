// Types for scripts/lib/haproxy.mjs.
import type { ClusterLayout } from "./cluster-layout.mjs";

export interface HaproxyServerStats {
  proxy: string;
  server: string;
  status: string;
  sessionsTotal: number;
  current: number;
  active: boolean;
  backup: boolean;
  retries: number;
  redispatches: number;
}

export const haproxyPackage: { pkg: string; present: () => boolean };
export function haproxyConfig(layout: ClusterLayout, options?: { appCheckPath?: string }): string;
export function parseHaproxyStats(csv: string): HaproxyServerStats[];
export function fetchHaproxyStats(layout: ClusterLayout): Promise<HaproxyServerStats[]>;
export function startHaproxy(
  layout: ClusterLayout,
  options?: { appCheckPath?: string },
): Promise<{ pid: number; exited: Promise<{ code: number | null; signal: string | null }>; stop(): Promise<void> }>;
