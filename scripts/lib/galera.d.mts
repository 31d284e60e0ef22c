// Types for scripts/lib/galera.mjs.
import type { ClusterLayout, GaleraNode } from "./cluster-layout.mjs";

export interface Grastate {
  uuid: string | null;
  seqno: number;
  safeToBootstrap: boolean;
}

export interface NodeStatus {
  size: number;
  state: string;
  ready: boolean;
  connected: boolean;
  clusterStatus: string;
  lastCommitted: number;
}

export interface NodeHandle {
  node: GaleraNode;
  pid: number;
  exited: Promise<{ code: number | null; signal: string | null }>;
  stop(): Promise<void>;
}

export const GALERA_PROVIDER: string;
export const galeraPackages: Array<{ pkg: string; present: () => boolean }>;
export function nodeQuery(node: GaleraNode, sql: string): Promise<string[][] | null>;
export function nodeStatus(node: GaleraNode): Promise<NodeStatus | null>;
export function readGrastate(datadir: string): Grastate | null;
export function parseGrastate(text: string): Grastate;
export function chooseBootstrapNode(nodes: Array<{ name: string; grastate: Grastate | null; recovered: number | null }>): {
  name: string;
  reason: string;
  needsSafeFlag: boolean;
};
export function nodeArgs(layout: ClusterLayout, node: GaleraNode, options?: { newCluster?: boolean; startPosition?: string | null; recover?: boolean }): string[];
export function startNode(layout: ClusterLayout, node: GaleraNode, options?: { newCluster?: boolean; recoverFirst?: boolean; timeoutMs?: number }): Promise<NodeHandle>;
export function startGalera(
  layout: ClusterLayout,
  options: { password: string; database: string; user?: string; checkStopping?: () => void },
): Promise<{ handles: NodeHandle[]; bootstrap: string }>;
export function stopGalera(handles: NodeHandle[]): Promise<void>;
export function rowCountsPerNode(layout: ClusterLayout, database: string): Promise<Record<string, Record<string, number> | null>>;
