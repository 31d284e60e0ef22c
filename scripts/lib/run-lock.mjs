// One `npm start` (or `npm test`) per checkout at a time, and clean-up after a run that was killed outright.
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import path from "node:path";
import { dataDir } from "./env.mjs";
import { commandLineOf, info, isAlive, terminatePid, UserFacingError } from "./proc.mjs";

/**
 * Take .data/<name>.lock. If a live run holds it, refuse with a clear message; if its owner died
 * (SIGKILL, power loss), end the child processes it recorded (checked by command line, so a reused
 * pid is never touched). Returns { record(name, pid, marker), release() }.
 */
export async function acquireRunLock(name, scriptMarker) {
  const file = path.join(dataDir, `${name}.lock`);
  mkdirSync(dataDir, { recursive: true });
  if (existsSync(file)) {
    let previous = null;
    try {
      previous = JSON.parse(readFileSync(file, "utf8"));
    } catch {
      // unreadable: treat as stale
    }
    if (previous && isAlive(previous.pid) && commandLineOf(previous.pid).includes(scriptMarker)) {
      throw new UserFacingError(
        `another ${name} is already running in this checkout (pid ${previous.pid}). Stop it first (Ctrl-C or kill ${previous.pid}).`,
      );
    }
    for (const child of previous?.children ?? []) {
      if (isAlive(child.pid) && commandLineOf(child.pid).includes(child.marker)) {
        info(`ending ${child.name} (pid ${child.pid}) left over from an earlier run`);
        await terminatePid(child.pid, { timeoutMs: 8000 });
      }
    }
  }
  const state = { pid: process.pid, startedAt: new Date().toISOString(), children: [] };
  const save = () => writeFileSync(file, `${JSON.stringify(state, null, 2)}\n`);
  save();
  return {
    record(childName, pid, marker) {
      state.children.push({ name: childName, pid, marker });
      save();
    },
    release() {
      try {
        const current = JSON.parse(readFileSync(file, "utf8"));
        if (current.pid === process.pid) rmSync(file, { force: true });
      } catch {
        // already gone
      }
    },
  };
}
