// The job worker as scripts/cluster.mjs starts it (one process with tsx as a loader; its command line
// names this file so the cluster's run lock can recognise it). Same as scripts/job-worker.ts.
import "./job-worker";
