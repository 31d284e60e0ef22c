// Types for scripts/lib/mail-catcher.mjs (plain ESM so it runs before node_modules exists).
export interface CaughtMessage {
  id: string;
  /** ISO 8601 time the catcher received it. */
  receivedAt: string;
  /** Sender address from the From header. */
  from: string;
  /** Recipient addresses from the SMTP envelope. */
  to: string[];
  subject: string;
  text: string;
  html: string;
}

export interface RunningCatcher {
  host: string;
  port: number;
  dir: string;
  close(): Promise<void>;
}

export function startMailCatcher(options: {
  host?: string;
  port?: number;
  dir: string;
  onMessage?: (message: CaughtMessage) => void;
}): Promise<RunningCatcher>;
