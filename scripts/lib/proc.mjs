// Process helpers shared by scripts/start.mjs and scripts/test.mjs.
// Plain Node ESM with no dependencies: these run before node_modules exists.
import { spawn } from "node:child_process";
import { existsSync, readFileSync } from "node:fs";
import net from "node:net";
import path from "node:path";

/** A stage banner, so a long log reads as a list of steps. */
export function banner(title) {
  const line = "=".repeat(Math.max(12, title.length + 8));
  console.log(`\n${line}\n=== ${title}\n${line}`);
}

export function info(message) {
  console.log(`[rakeline] ${message}`);
}

/** An error whose message is meant for the person at the terminal (no stack trace). */
export class UserFacingError extends Error {}

/** Foreground commands still running; a shutdown signal ends them too. */
const foreground = new Set();

export function killForeground(signal = "SIGTERM") {
  for (const child of foreground) {
    try {
      child.kill(signal);
    } catch {
      // already gone
    }
  }
}

/**
 * Run a command to completion with inherited output. Resolves with the exit code
 * (a signal counts as failure); rejects only when the command cannot be started.
 */
export function run(command, args, options = {}) {
  return new Promise((resolve, reject) => {
    const child = spawn(command, args, { stdio: options.stdio ?? "inherit", ...options });
    foreground.add(child);
    let output = "";
    child.stdout?.on("data", (chunk) => (output += chunk));
    child.stderr?.on("data", (chunk) => (output += chunk));
    child.on("error", (error) => {
      foreground.delete(child);
      reject(error);
    });
    child.on("close", (code, signal) => {
      foreground.delete(child);
      resolve({ code: code ?? (signal ? 128 : 1), signal, output });
    });
  });
}

/** Run and capture output; throws with the output when the command fails. */
export async function runQuiet(command, args, options = {}) {
  const result = await run(command, args, { ...options, stdio: ["ignore", "pipe", "pipe"] });
  if (result.code !== 0) {
    throw new UserFacingError(`${path.basename(command)} ${args.join(" ")} failed (exit ${result.code}):\n${result.output.trim()}`);
  }
  return result.output;
}

const SYSTEM_DIRS = ["/usr/local/sbin", "/usr/local/bin", "/usr/sbin", "/usr/bin", "/sbin", "/bin"];

/** Absolute path of an executable on PATH (plus the sbin dirs a non-login root shell may lack), or null. */
export function findExecutable(name) {
  const dirs = [...(process.env.PATH ?? "").split(path.delimiter).filter(Boolean), ...SYSTEM_DIRS];
  for (const dir of dirs) {
    const candidate = path.join(dir, name);
    if (existsSync(candidate)) return candidate;
  }
  return null;
}

export function isAlive(pid) {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return error.code === "EPERM";
  }
}

/** The command line of a live process (Linux /proc), or "" when unknown. */
export function commandLineOf(pid) {
  try {
    return readFileSync(`/proc/${pid}/cmdline`, "utf8").split("\0").join(" ");
  } catch {
    return "";
  }
}

export const sleep = (ms) => new Promise((resolve) => setTimeout(resolve, ms));

/** Poll until the pid is gone; true when it exited within the time. */
export async function waitForExit(pid, timeoutMs) {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (!isAlive(pid)) return true;
    await sleep(100);
  }
  return !isAlive(pid);
}

/** SIGTERM, wait, then SIGKILL: robust against servers that ignore the first SIGTERM. */
export async function terminatePid(pid, { timeoutMs = 8000, group = false } = {}) {
  const target = group ? -pid : pid;
  const send = (signal) => {
    try {
      process.kill(target, signal);
    } catch {
      // already gone
    }
  };
  if (!isAlive(pid)) return;
  send("SIGTERM");
  if (await waitForExit(pid, timeoutMs)) return;
  info(`pid ${pid} ignored SIGTERM for ${timeoutMs / 1000} s; sending SIGKILL`);
  send("SIGKILL");
  await waitForExit(pid, 3000);
}

/** A long-running child in its own process group, so a terminal Ctrl-C reaches only us and we stop it in order. */
export function spawnService(name, command, args, options = {}) {
  const child = spawn(command, args, { detached: true, stdio: ["ignore", "inherit", "inherit"], ...options });
  const exited = new Promise((resolve) => {
    child.on("exit", (code, signal) => resolve({ code, signal }));
    child.on("error", (error) => resolve({ code: 1, signal: null, error }));
  });
  return { name, child, exited };
}

/** Throws a clear message when host:port is already taken. */
export async function assertPortFree(host, port, hint) {
  await new Promise((resolve, reject) => {
    const probe = net.createServer();
    probe.once("error", (error) => {
      if (error.code === "EADDRINUSE") {
        reject(new UserFacingError(`${host}:${port} is already in use. ${hint}`));
      } else reject(error);
    });
    probe.listen(port, host, () => probe.close(resolve));
  });
}

/** Wait until an HTTP server answers at url (any status), or fail when the child dies or time runs out. */
export async function waitForHttp(url, { timeoutMs = 60_000, service } = {}) {
  const deadline = Date.now() + timeoutMs;
  let died = false;
  service?.exited.then(() => (died = true));
  while (Date.now() < deadline) {
    if (died) throw new UserFacingError(`${service.name} exited before it answered at ${url}`);
    try {
      const response = await fetch(url, { redirect: "manual", signal: AbortSignal.timeout(2000) });
      await response.arrayBuffer();
      return response.status;
    } catch {
      await sleep(250);
    }
  }
  throw new UserFacingError(`nothing answered at ${url} within ${timeoutMs / 1000} s`);
}

/**
 * Things started, stopped in reverse order (server, catcher, database) exactly once.
 * Each entry: { name, stop: async () => void }.
 */
export function createStack() {
  const entries = [];
  let stopping = null;
  return {
    push(name, stop) {
      entries.push({ name, stop });
    },
    stopAll() {
      stopping ??= (async () => {
        killForeground();
        while (entries.length) {
          const { name, stop } = entries.pop();
          try {
            info(`stopping ${name}`);
            await stop();
          } catch (error) {
            console.error(`[rakeline] could not stop ${name}: ${error.message}`);
          }
        }
      })();
      return stopping;
    },
  };
}

/** Resolve a package's bin script so it runs under this Node without an npx/shell layer in between. */
export function packageBin(root, packageName, binName) {
  const dir = path.join(root, "node_modules", packageName);
  const manifest = JSON.parse(readFileSync(path.join(dir, "package.json"), "utf8"));
  const bin = typeof manifest.bin === "string" ? manifest.bin : manifest.bin?.[binName ?? packageName];
  if (!bin) throw new UserFacingError(`${packageName} has no "${binName}" executable; run npm ci`);
  return path.join(dir, bin);
}

/**
 * Call onGone when our parent process exits. `npm start`/`npm test` run us under npm, and npm exits on SIGTERM
 * without passing it on; without this the services would outlive the command that was stopped.
 */
export function watchParent(onGone, intervalMs = 500) {
  // Once the parent is gone our output pipe may be closed too: a failed write must not end the shutdown.
  for (const stream of [process.stdout, process.stderr]) stream.on("error", () => {});
  const parent = process.ppid;
  const timer = setInterval(() => {
    if (process.ppid !== parent || !isAlive(parent)) {
      clearInterval(timer);
      onGone();
    }
  }, intervalMs);
  timer.unref();
}
