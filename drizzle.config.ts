import { defineConfig } from "drizzle-kit";

// Used by `npm run db:generate` only. Migrations are applied at start by scripts/ with Drizzle's migrator.
export default defineConfig({
  dialect: "mysql",
  schema: "./app/db/schema/index.ts",
  out: "./drizzle",
  dbCredentials: { url: process.env.DATABASE_URL ?? "mysql://rakeline@127.0.0.1:3307/rakeline" },
});
