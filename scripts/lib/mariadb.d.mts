// Types for the parts of scripts/lib/mariadb.mjs that tests use.
export type MariaDBInstance = { name: string; datadir: string; dbPort: number; database: string; passwordFile: string };
export function startMariaDB(instance: MariaDBInstance, options?: { fresh?: boolean }): Promise<{ url: string; pid: number; stop(): Promise<void> }>;
export function stopLeftoverServer(instance: MariaDBInstance): Promise<void>;
