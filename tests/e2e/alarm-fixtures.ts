import Database from "better-sqlite3";
import type { Page } from "@playwright/test";
import { e2e } from "./env";

// Alarms end to end. The demo runs without its simulator here, so each test raises its own alarm the way the alarm
// engine does: a row in `alarms` (active, unacknowledged) and its entry in the event log, written straight into the
// e2e database while the server runs (SQLite in WAL mode takes the second writer).

export type Raised = { id: number; compressorName: string };

export function raiseAlarm(opts: { deviceId: string; key: string; priority: "critical" | "warning" | "advisory"; signal: string; value: number; limit: number }): Raised {
  const db = new Database(e2e.databaseUrl);
  db.pragma("busy_timeout = 5000");
  try {
    const unit = db.prepare("SELECT id, site_id AS siteId, name FROM compressors WHERE device_id = ?").get(opts.deviceId) as
      | { id: number; siteId: number; name: string }
      | undefined;
    if (!unit) throw new Error(`no compressor ${opts.deviceId} in ${e2e.databaseUrl}`);
    const now = Date.now();
    return db.transaction(() => {
      // Only one open alarm per compressor and key: close any left by an earlier run.
      db.prepare("UPDATE alarms SET state = 'normal', active = 0, cleared_at = ?, updated_at = ? WHERE compressor_id = ? AND key = ? AND state <> 'normal'").run(
        now,
        now,
        unit.id,
        opts.key,
      );
      const id = Number(
        db
          .prepare(
            `INSERT INTO alarms (compressor_id, site_id, key, priority, signal, state, active, raised_at, value, limit_value, updated_at)
             VALUES (?, ?, ?, ?, ?, 'active-unacknowledged', 1, ?, ?, ?, ?)`,
          )
          .run(unit.id, unit.siteId, opts.key, opts.priority, opts.signal, now, opts.value, opts.limit, now).lastInsertRowid,
      );
      db.prepare(
        `INSERT INTO events (ts, kind, action, priority, site_id, compressor_id, alarm_id, actor, text)
         VALUES (?, 'alarm', 'alarm.raise', ?, ?, ?, ?, '', ?)`,
      ).run(now, opts.priority, unit.siteId, unit.id, id, `${unit.name}: alarm raised by the end-to-end test (${opts.key})`);
      return { id, compressorName: unit.name };
    })();
  } finally {
    db.close();
  }
}

/** Critical alarms of other units (e.g. communication lost while no simulator runs) may announce themselves: clear them away. */
export async function dismissToasts(page: Page) {
  await page.waitForLoadState("networkidle");
  const buttons = page.getByTestId("critical-toast").getByRole("button", { name: /^Dismiss/ });
  while ((await buttons.count()) > 0) await buttons.first().click();
}

/** Returns a test's alarm to normal, so that later specs start without it (or its announcement). */
export function closeAlarm(id: number): void {
  const db = new Database(e2e.databaseUrl);
  db.pragma("busy_timeout = 5000");
  try {
    const now = Date.now();
    db.prepare("UPDATE alarms SET state = 'normal', active = 0, cleared_at = ?, updated_at = ? WHERE id = ?").run(now, now, id);
  } finally {
    db.close();
  }
}

