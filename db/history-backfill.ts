import { eq } from "drizzle-orm";
import type { Db } from "./client";
import { settings } from "./schema";

// A mark that history is being written straight into the database (the demo's backfill), held by the writing
// process. Jobs that summarise past months — the monthly report e-mail — wait while it stands, instead of
// reporting a month whose history is only half written.

const KEY = "history.backfill";

export type HistoryBackfillMark = { pid: number; since: number };

export function markHistoryBackfill(db: Db, pid: number, now = Date.now()): void {
  const value = JSON.stringify({ pid, since: now } satisfies HistoryBackfillMark);
  db.insert(settings).values({ key: KEY, value, updatedAt: now }).onConflictDoUpdate({ target: settings.key, set: { value, updatedAt: now } }).run();
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
    return typeof v.pid === "number" && typeof v.since === "number" ? { pid: v.pid, since: v.since } : null;
  } catch {
    return null;
  }
}
