import type { Db } from "@/db/client";
import { noteHistoryBackfillProgress } from "@/db/history-backfill";

/**
 * Reports a backfill's progress: a line every `everyMs` for a log that is not a terminal (the demo's), and the
 * percentage on the history mark the web pages read to say the history is still being written.
 */
export function backfillProgress(db: Db, log: (line: string) => void, opts: { everyMs?: number; lines?: boolean; now?: () => number; pid?: number } = {}) {
  const everyMs = opts.everyMs ?? 5_000;
  const now = opts.now ?? Date.now;
  const pid = opts.pid ?? process.pid;
  const startedAt = now();
  let lastAt = -Infinity;
  return (done: number, total: number) => {
    const t = now();
    const finished = done >= total;
    if (!finished && t - lastAt < everyMs) return;
    lastAt = t;
    const percent = total > 0 ? Math.min(100, Math.floor((done / total) * 100)) : 100;
    noteHistoryBackfillProgress(db, pid, percent, t);
    if (opts.lines === false) return;
    const elapsedS = (t - startedAt) / 1000;
    const leftS = done > 0 && !finished ? Math.round((elapsedS * (total - done)) / done) : null;
    log(`history ${percent} % written (${Math.round(done).toLocaleString("en-GB")} of ${Math.round(total).toLocaleString("en-GB")} readings)${leftS !== null ? `, about ${leftS} s left` : ""}`);
  };
}
