// `npm start` used to print "nothing left running" as soon as each stop function had returned, although a
// stop can return while its process is still winding down. The closing line now waits for every pid.
import { spawn } from "node:child_process";
import { describe, expect, it } from "vitest";
import { createStack, isAlive } from "../../scripts/lib/proc.mjs";
import { stopAndConfirm } from "../../scripts/lib/shutdown.mjs";

/** A process that takes `ms` to end after it is asked to (like a database flushing on shutdown); resolves once it listens for SIGTERM. */
async function slowToExit(ms: number) {
  const child = spawn(
    process.execPath,
    ["-e", `process.on("SIGTERM", () => setTimeout(() => process.exit(0), ${ms})); setInterval(() => {}, 1000); console.log("ready");`],
    { stdio: ["ignore", "pipe", "ignore"] },
  );
  await new Promise((resolve) => child.stdout!.once("data", resolve));
  return child;
}

describe("npm start's shutdown", () => {
  it("says nothing is left running only after the processes have exited", async () => {
    const child = await slowToExit(1500);
    const stack = createStack();
    // A stop that asks and returns at once, as a stop that gives up waiting does.
    stack.push("slow service", () => void child.kill("SIGTERM"));
    const closing = await stopAndConfirm(stack, [{ name: "slow service", pid: child.pid! }], { waitMs: 20_000 });
    expect(closing).toBe("stopped; nothing left running");
    // POSIX kill(2) with signal 0: ESRCH once the process is gone.
    expect(isAlive(child.pid!)).toBe(false);
  });

  it("names a process that is still running when the wait ends, instead of claiming nothing is left", async () => {
    const child = await slowToExit(60_000);
    const stack = createStack();
    stack.push("stubborn service", () => void child.kill("SIGTERM"));
    try {
      const closing = await stopAndConfirm(stack, [{ name: "stubborn service", pid: child.pid! }], { waitMs: 300 });
      expect(closing).toMatch(new RegExp(`still running: stubborn service \\(pid ${child.pid}\\)`));
      expect(closing).not.toMatch(/nothing left running/);
    } finally {
      child.kill("SIGKILL");
    }
  });
});
