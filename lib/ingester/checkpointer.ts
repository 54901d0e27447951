import { Worker } from "node:worker_threads";

// Runs SQLite WAL checkpoints on a thread of its own, so copying the log into the database file (and its
// fsync) never stalls the ingester's event loop, its commits or the WebSocket fan-out.
const WORKER = `
const { parentPort, workerData } = require("node:worker_threads");
const Database = require("better-sqlite3");
const db = new Database(workerData.file);
db.pragma("busy_timeout = 1000");
const run = () => { try { db.pragma("wal_checkpoint(PASSIVE)"); } catch {} };
const timer = setInterval(run, workerData.everyMs);
parentPort.on("message", () => { clearInterval(timer); run(); db.close(); parentPort.close(); });
`;

export type Checkpointer = { close(): Promise<void> };

export function startCheckpointer(file: string, everyMs = 1_000): Checkpointer {
  const worker = new Worker(WORKER, { eval: true, workerData: { file, everyMs } });
  worker.on("error", (e) => console.error(`[ingester] checkpointer: ${e.message}`));
  worker.unref();
  return {
    close: () =>
      new Promise<void>((resolve) => {
        worker.once("exit", () => resolve());
        worker.postMessage("stop");
        setTimeout(() => void worker.terminate(), 5_000).unref();
      }),
  };
}
