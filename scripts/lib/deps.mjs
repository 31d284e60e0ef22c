// npm dependencies: `npm ci` when node_modules is missing or no longer matches package-lock.json.
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { banner, info, run, UserFacingError } from "./proc.mjs";

function readJson(file) {
  try {
    return JSON.parse(readFileSync(file, "utf8"));
  } catch {
    return null;
  }
}

/**
 * Why node_modules is stale against the lockfile, or null when it is current.
 * npm keeps a record of what it installed in node_modules/.package-lock.json (its "hidden lockfile");
 * a package in package-lock.json that is missing there, or at another version, means `npm ci` is due.
 * Optional packages for other platforms are never installed, so their absence is fine.
 */
export function staleReason(root) {
  const lock = readJson(path.join(root, "package-lock.json"));
  if (!lock?.packages) return "package-lock.json is missing or unreadable";
  if (!existsSync(path.join(root, "node_modules"))) return "node_modules is missing";
  const installed = readJson(path.join(root, "node_modules", ".package-lock.json"));
  if (!installed?.packages) return "node_modules has no record of an npm install";
  for (const [key, wanted] of Object.entries(lock.packages)) {
    if (key === "" || !key.startsWith("node_modules/")) continue;
    const have = installed.packages[key];
    if (!have) {
      if (wanted.optional || wanted.devOptional || wanted.peer) continue;
      return `${key.slice("node_modules/".length)} is not installed`;
    }
    if (wanted.version && have.version !== wanted.version) {
      return `${key.slice("node_modules/".length)} is ${have.version}, the lockfile wants ${wanted.version}`;
    }
  }
  return null;
}

export async function ensureNodeModules(root) {
  const reason = staleReason(root);
  if (!reason) {
    info("npm dependencies are installed and match package-lock.json");
    return;
  }
  banner(`npm ci (${reason})`);
  const npm = process.platform === "win32" ? "npm.cmd" : "npm";
  const { code } = await run(npm, ["ci", "--no-audit", "--no-fund"], { cwd: root });
  if (code !== 0) throw new UserFacingError(`npm ci failed (exit ${code}); see the npm output above`);
}
