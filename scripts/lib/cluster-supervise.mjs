// Keeps the cluster's processes running the way a service manager (systemd's Restart=on-failure) does
// on real hosts: a process that exits on its own is started again after a pause, so a killed app
// process, database node or job worker comes back; one that keeps dying stops the whole cluster.
// The state file (.data/cluster/state.json) lists every process with its current pid and port, for
// `npm run bench:cluster` and for people reading `ps`.
import { renameSync, writeFileSync } from "node:fs";
import { info, sleep } from "./proc.mjs";

const RESTART_PAUSE_MS = 1500;
const MAX_QUICK_RESTARTS = 5;
const QUICK_WINDOW_MS = 120_000;

/**
 * options: { stateFile, isStopping(), onGiveUp(reason), record(name, pid, marker) (run lock), base: {...} }
 * supervise(name, role, start, meta) starts a process now and keeps it running.
 * start() resolves with { pid, exited: Promise, stop: async () => void }.
 */
export function createSupervisor(options) {
  const entries = [];
  const base = { supervisorPid: process.pid, startedAt: new Date().toISOString(), ready: false, ...options.base };

  function writeState() {
    const state = {
      ...base,
      updatedAt: new Date().toISOString(),
      processes: entries.map(({ name, role, pid, restarts, meta: { marker: _marker, ...meta }, up }) => ({ name, role, pid, up, restarts, ...meta })),
    };
    const tmp = `${options.stateFile}.tmp`;
    writeFileSync(tmp, `${JSON.stringify(state, null, 2)}\n`);
    renameSync(tmp, options.stateFile);
  }

  async function keepRunning(entry) {
    for (;;) {
      const result = await entry.handle.exited;
      entry.up = false;
      writeState();
      if (options.isStopping() || entry.stopped) return;
      const now = Date.now();
      entry.recentExits = entry.recentExits.filter((t) => now - t < QUICK_WINDOW_MS);
      entry.recentExits.push(now);
      if (entry.recentExits.length > MAX_QUICK_RESTARTS) {
        options.onGiveUp(`${entry.name} exited ${entry.recentExits.length} times within ${QUICK_WINDOW_MS / 1000} s; giving up`);
        return;
      }
      info(`${entry.name} (pid ${entry.pid}) exited on its own (code ${result.code}, signal ${result.signal}); starting it again in ${RESTART_PAUSE_MS / 1000} s`);
      await sleep(RESTART_PAUSE_MS);
      for (;;) {
        if (options.isStopping() || entry.stopped) return;
        try {
          entry.handle = await entry.start({ restart: true });
          break;
        } catch (error) {
          entry.recentExits.push(Date.now());
          if (entry.recentExits.length > MAX_QUICK_RESTARTS) {
            options.onGiveUp(`${entry.name} could not be started again: ${error.message}`);
            return;
          }
          info(`${entry.name} did not start again (${error.message.split("\n")[0]}); trying once more`);
          await sleep(RESTART_PAUSE_MS * 2);
        }
      }
      entry.pid = entry.handle.pid;
      entry.restarts += 1;
      entry.up = true;
      options.record?.(entry.name, entry.pid, entry.meta.marker);
      info(`${entry.name} is running again (pid ${entry.pid})`);
      writeState();
    }
  }

  return {
    async supervise(name, role, start, meta = {}) {
      const handle = await start({ restart: false });
      const entry = { name, role, start, handle, pid: handle.pid, restarts: 0, meta, up: true, stopped: false, recentExits: [] };
      entries.push(entry);
      options.record?.(name, handle.pid, meta.marker);
      writeState();
      entry.watching = keepRunning(entry);
      return entry;
    },
    /** Mark the cluster ready (or not) in the state file. */
    setReady(ready, extra = {}) {
      Object.assign(base, { ready }, extra);
      writeState();
    },
    /** Stop every process of the given roles, in reverse start order, and stop restarting them. */
    async stopRoles(roles) {
      for (const entry of [...entries].reverse()) {
        if (!roles.includes(entry.role)) continue;
        entry.stopped = true;
        info(`stopping ${entry.name}`);
        try {
          await entry.handle.stop();
        } catch (error) {
          console.error(`[rakeline] could not stop ${entry.name}: ${error.message}`);
        }
      }
      writeState();
    },
    entries,
    writeState,
  };
}
