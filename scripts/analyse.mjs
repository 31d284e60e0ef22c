// Starts the analyse CLI (scripts/analyse.ts) from a cached plain-JS bundle, so each run pays ~0.1 s
// of start-up instead of ~1 s through tsx (batch users run it once per log). Without a bundler the
// TypeScript is loaded through tsx, with the same behaviour.
import { fileURLToPath, pathToFileURL } from "node:url";
import { cachedBundle } from "./lib/bundle-cache.mjs";

const ROOT = fileURLToPath(new URL("../", import.meta.url));
const bundle = cachedBundle(ROOT, "analyse", `${ROOT}scripts/analyse.ts`, ["app/engine", "scripts/lib"]);
if (bundle) {
  await import(pathToFileURL(bundle).href);
} else {
  const { register } = await import("tsx/esm/api");
  register();
  await import(pathToFileURL(`${ROOT}scripts/analyse.ts`).href);
}
