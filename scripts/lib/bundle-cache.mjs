/**
 * Plain-JS bundles of our TypeScript entry points (the analyse CLI, the part-thread worker), cached
 * under node_modules/.cache/rakeline by a hash of their sources and the lockfile: a process or
 * worker then starts in ~0.1 s instead of ~1 s through tsx's loader. The bundler (esbuild, a dev
 * dependency) is loaded only when a bundle has to be built; null means "no bundle: load the
 * TypeScript through tsx instead". Inside a bundle, `__RAKELINE_ROOT__` is the checkout's root
 * (import.meta.url there names the cache file, not the source).
 */
import { createHash } from "node:crypto";
import { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, rmSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import { fileURLToPath } from "node:url";

/* global __RAKELINE_ROOT__ */
// This file's own path, also when it runs inside a bundle (whose import.meta.url is the cache file).
const SELF = typeof __RAKELINE_ROOT__ === "string" ? `${__RAKELINE_ROOT__}scripts/lib/bundle-cache.mjs` : fileURLToPath(import.meta.url);

/**
 * The cached bundle of `entry` (an absolute path under `root`), built if missing; its hash covers
 * the entry, every .ts file in `dirs` (relative to root, not recursive), the lockfile and this file.
 * Returns the bundle's path, or null when it cannot be built.
 */
export function cachedBundle(root, name, entry, dirs) {
  const sources = new Set([entry, SELF, `${root}package-lock.json`]);
  for (const d of dirs) for (const f of readdirSync(`${root}${d}`)) if (f.endsWith(".ts")) sources.add(`${root}${d}/${f}`);
  const hash = createHash("sha256");
  for (const f of [...sources].sort()) hash.update(f).update(readFileSync(f));
  const dir = `${root}node_modules/.cache/rakeline`;
  const pattern = new RegExp(`^${name}-[0-9a-f]{16}\\.mjs$`);
  const out = `${dir}/${name}-${hash.digest("hex").slice(0, 16)}.mjs`;
  if (existsSync(out)) return out;
  try {
    const { buildSync } = createRequire(import.meta.url)("esbuild");
    const built = buildSync({
      entryPoints: [entry], bundle: true, platform: "node", format: "esm", write: false, logLevel: "silent",
      define: { __RAKELINE_ROOT__: JSON.stringify(root) },
      // CommonJS packages inside an ES module bundle still call require().
      banner: { js: "import { createRequire as __rakelineRequire } from 'node:module'; const require = __rakelineRequire(import.meta.url);" },
    });
    mkdirSync(dir, { recursive: true });
    // Written aside and renamed: processes starting at the same time never read half a file.
    const tmp = `${out}.${process.pid}.tmp`;
    writeFileSync(tmp, built.outputFiles[0].contents);
    renameSync(tmp, out);
    // Bundles of earlier sources are not needed again.
    for (const f of readdirSync(dir)) if (pattern.test(f) && `${dir}/${f}` !== out) rmSync(`${dir}/${f}`, { force: true });
    return out;
  } catch {
    return null;
  }
}
