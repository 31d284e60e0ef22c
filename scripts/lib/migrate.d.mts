// Types for scripts/lib/migrate.mjs.
export function applyMigrations(databaseUrl: string, migrationsFolder: string): Promise<number>;
