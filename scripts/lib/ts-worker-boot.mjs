// Worker-thread entry for a TypeScript module: registers tsx's loader in this thread, then loads
// the module named in workerData.entry (Node 20 does not pass the parent's loader to a worker).
import { workerData } from "node:worker_threads";
import { register } from "tsx/esm/api";

register();
await import(workerData.entry);
