// Thin entry for the demo seed: `npx tsx scripts/seed.ts` with DATABASE_URL set (npm start runs it).
// The seed itself lives in app/server/seed/index.server.ts and must be idempotent.
import { existsSync } from "node:fs";
import { fileURLToPath, pathToFileURL } from "node:url";

const seedModule = fileURLToPath(new URL("../app/server/seed/index.server.ts", import.meta.url));

if (!existsSync(seedModule)) {
  console.log("[seed] app/server/seed/index.server.ts does not exist yet; no demo data to seed");
  process.exit(0);
}

// Imported by path at run time so this entry type-checks before the seed module exists.
const loaded = (await import(pathToFileURL(seedModule).href)) as { seedDemo?: () => Promise<void> };
if (typeof loaded.seedDemo !== "function") {
  console.error("[seed] app/server/seed/index.server.ts must export async function seedDemo()");
  process.exit(1);
}
await loaded.seedDemo();
console.log("[seed] demo scenario is in place");
// The app's database pool keeps the event loop alive; the seed is done.
process.exit(0);
