// The end of `npm start`: stop what was started, in reverse order, then make sure each process really ended
// before saying so. A stop function can return while its process is still winding down (MariaDB flushing,
// a server that ignored SIGTERM until SIGKILL): "nothing left running" is printed only once every recorded
// pid is gone, and a process that outlives the wait is named instead.
import { info, isAlive, sleep } from "./proc.mjs";

/**
 * stack: createStack(); children: [{ name, pid }] recorded while starting. Resolves with the closing line:
 * "stopped; nothing left running", or which processes are still running after waitMs.
 */
export async function stopAndConfirm(stack, children, { waitMs = 60_000, pollMs = 100 } = {}) {
  await stack.stopAll();
  const deadline = Date.now() + waitMs;
  let announced = false;
  for (;;) {
    const alive = children.filter((child) => isAlive(child.pid));
    if (alive.length === 0) return "stopped; nothing left running";
    if (Date.now() > deadline) {
      return `stopped, but still running: ${alive.map((c) => `${c.name} (pid ${c.pid})`).join(", ")}; it should end on its own, or stop it with kill`;
    }
    if (!announced) {
      info(`waiting for ${alive.map((c) => `${c.name} (pid ${c.pid})`).join(", ")} to exit`);
      announced = true;
    }
    await sleep(pollMs);
  }
}
