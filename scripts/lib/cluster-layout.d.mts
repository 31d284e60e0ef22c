// Types for scripts/lib/cluster-layout.mjs.
export interface GaleraNode {
  name: string;
  index: number;
  datadir: string;
  socket: string;
  pidFile: string;
  log: string;
  tmpdir: string;
  clientPort: number;
  groupPort: number;
  istPort: number;
  sstPort: number;
}

export interface ClusterLayout {
  base: number;
  dir: string;
  logDir: string;
  stateFile: string;
  clusterName: string;
  database: string;
  passwordFile: string;
  appFrontPort: number;
  statsPort: number;
  dbFrontPort: number;
  appPorts: number[];
  workerHealthPorts: number[];
  smtpPort: number;
  mailDir: string;
  s3Port: number;
  s3Dir: string;
  s3Bucket: string;
  uploadDir: string;
  haproxyConfig: string;
  nodes: GaleraNode[];
}

export const DEFAULT_PORT_BASE: number;
export function clusterLayout(options?: { base?: number; dir?: string; apps?: number; workers?: number }): ClusterLayout;
