import { eq } from "drizzle-orm";
import type { BackfillStatus } from "@/shared/history";
import type { Db } from "./client";
import { settings } from "./schema";

// A mark that history is being written straight into the database (the demo's backfill), held by the writing
// process. Jobs that summarise past months — the monthly report e-mail — wait while it stands, instead of
// reporting a month whose history is only half written; signed-in pages say how far it has got.

const KEY = "history.backfill";

export type HistoryBackfillMark = { pid: number; since: number; percent: number };

function write(db: Db, mark: HistoryBackfillMark, now: number): void {
  const value = JSON.stringify(mark);
  db.insert(settings).values({ key: KEY, value, updatedAt: now }).onConflictDoUpdate({ target: settings.key, set: { value, updatedAt: now } }).run();
}

export function markHistoryBackfill(db: Db, pid: number, now = Date.now()): void {
  write(db, { pid, since: now, percent: 0 }, now);
}

/** How far the backfill has got, by the process holding the mark (it takes the mark over if none stands). */
export function noteHistoryBackfillProgress(db: Db, pid: number, percent: number, now = Date.now()): void {
  const mark = historyBackfillMark(db);
  write(db, { pid: mark?.pid ?? pid, since: mark?.since ?? now, percent }, now);
}

export function clearHistoryBackfill(db: Db): void {
  db.delete(settings).where(eq(settings.key, KEY)).run();
}

/** The standing mark, if any (the caller judges whether its process is still alive). */
export function historyBackfillMark(db: Db): HistoryBackfillMark | null {
  const row = db.select({ value: settings.value }).from(settings).where(eq(settings.key, KEY)).get();
  if (!row) return null;
  try {
    const v = JSON.parse(row.value) as Partial<HistoryBackfillMark>;
    return typeof v.pid === "number" && typeof v.since === "number" ? { pid: v.pid, since: v.since, percent: typeof v.percent === "number" ? v.percent : 0 } : null;
  } catch {
    return null;
  }
}

/** What the web shows: a backfill runs while its mark stands and the process that set it lives. */
export function backfillStatus(db: Db, alive: (pid: number) => boolean): BackfillStatus | null {
  const mark = historyBackfillMark(db);
  return mark && alive(mark.pid) ? { running: true, percent: mark.percent, since: mark.since } : null;
}
