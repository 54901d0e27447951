import { eq } from "drizzle-orm";
import type { BackfillStatus } from "@/shared/history";
import type { Db } from "./client";
import { settings } from "./schema";

const KEY = "history.backfill";


export function writeBackfillStatus(db: Db, status: BackfillStatus): void {
  const value = JSON.stringify(status);
  db.insert(settings)
    .values({ key: KEY, value, updatedAt: status.updatedAt })
    .onConflictDoUpdate({ target: settings.key, set: { value, updatedAt: status.updatedAt } })
    .run();
}

/** The backfill's status, or null when none has run. A running one silent for `staleMs` has died and no longer counts. */
export function readBackfillStatus(db: Db, now = Date.now(), staleMs = 120_000): BackfillStatus | null {
  const row = db.select({ value: settings.value }).from(settings).where(eq(settings.key, KEY)).get();
  if (!row) return null;
  const status = JSON.parse(row.value) as BackfillStatus;
  return status.running && now - status.updatedAt > staleMs ? { ...status, running: false } : status;
}
