import Database from "better-sqlite3";
import { expect, test, type Page } from "@playwright/test";
import { denialReason } from "@/shared/roles";
import { e2e } from "./env";
import { signIn } from "./helpers";

// Alarms end to end. The demo runs without its simulator here, so each test raises its own alarm the way the alarm
// engine does: a row in `alarms` (active, unacknowledged) and its entry in the event log, written straight into the
// e2e database while the server runs (SQLite in WAL mode takes the second writer).

type Raised = { id: number; compressorName: string };

function raiseAlarm(opts: { deviceId: string; key: string; priority: "critical" | "warning" | "advisory"; signal: string; value: number; limit: number }): Raised {
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
async function dismissToasts(page: Page) {
  await page.waitForLoadState("networkidle");
  const buttons = page.getByTestId("critical-toast").getByRole("button", { name: /^Dismiss/ });
  while ((await buttons.count()) > 0) await buttons.first().click();
}

/** Returns a test's alarm to normal, so that later specs start without it (or its announcement). */
function closeAlarm(id: number): void {
  const db = new Database(e2e.databaseUrl);
  db.pragma("busy_timeout = 5000");
  try {
    const now = Date.now();
    db.prepare("UPDATE alarms SET state = 'normal', active = 0, cleared_at = ?, updated_at = ? WHERE id = ?").run(now, now, id);
  } finally {
    db.close();
  }
}

const raised: number[] = [];
test.afterAll(() => {
  for (const id of raised) closeAlarm(id);
});

test("a supervisor acknowledges an alarm with a comment and it changes state", async ({ page }) => {
  const alarm = raiseAlarm({ deviceId: "hr-workshop", key: "intakeC.high.warning", priority: "warning", signal: "intakeC", value: 47.5, limit: 45 });
  raised.push(alarm.id);
  await signIn(page, "supervisor");
  await page.goto(`/alarms?id=${alarm.id}`);
  const row = page.locator(`[data-testid="alarm-row"][data-alarm-id="${alarm.id}"]`);
  await expect(row).toBeVisible();
  await dismissToasts(page);
  await expect(row).toHaveAttribute("data-state", "active-unacknowledged");
  await expect(row).toContainText("Intake temperature high");
  await expect(row).toContainText("Warning");
  await expect(row).toContainText(alarm.compressorName);

  await row.getByRole("button", { name: /^Acknowledge/ }).click();
  const form = page.getByTestId("alarm-action-form");
  await expect(form).toBeVisible();
  // The comment is required: an empty one is refused at the field.
  await form.getByRole("button", { name: "Acknowledge" }).click();
  await expect(form.getByText(/at least 3 characters/)).toBeVisible();
  await form.getByLabel(/Comment/).fill("Plant-room door propped open, intake cooling down");
  await form.getByRole("button", { name: "Acknowledge" }).click();

  await expect(page.getByRole("status").filter({ hasText: "Acknowledged 1 alarm." })).toBeVisible();
  await expect(row).toHaveAttribute("data-state", "active-acknowledged");
  await expect(row.getByTestId("alarm-state")).toHaveText("Active, acknowledged");
  await expect(row).toContainText("Plant-room door propped open");
  await expect(row.getByRole("button", { name: /^Acknowledge/ })).toHaveCount(0);

  // The acknowledgement is in the event log, with the comment.
  await page.goto(`/events?q=${encodeURIComponent("Plant-room door")}`);
  await expect(page.getByTestId("event-row").filter({ hasText: "acknowledged" })).toContainText("Plant-room door propped open");
});

test("a viewer sees the acknowledge control disabled, with the reason, and is told of a new critical alarm", async ({ page }) => {
  const alarm = raiseAlarm({ deviceId: "cr-boat", key: "oilBar.low.critical", priority: "critical", signal: "oilBar", value: 0.6, limit: 1.5 });
  raised.push(alarm.id);
  await signIn(page, "viewer");
  // The announcement comes to any signed-in page, the board included.
  const toast = page.locator(`[data-testid="critical-toast"][data-alarm-id="${alarm.id}"]`);
  await expect(toast).toContainText("Oil pressure low");
  await expect(toast).toContainText("Critical");
  await expect(page.getByTestId("critical-toasts")).toHaveAttribute("aria-live", "assertive");

  await page.goto(`/alarms?id=${alarm.id}`);
  const row = page.locator(`[data-testid="alarm-row"][data-alarm-id="${alarm.id}"]`);
  await expect(row).toBeVisible();
  const ack = row.getByRole("button", { name: /^Acknowledge/ });
  await expect(ack).toBeDisabled();
  const reason = denialReason("alarms.acknowledge");
  await expect(ack).toHaveAccessibleDescription(reason);
  await expect(page.getByTestId("alarm-denials")).toContainText(reason);
  await expect(row.getByRole("button", { name: /^Shelve/ })).toBeDisabled();

  // Seen once per session: a reload does not announce it again.
  await page.reload();
  await expect(row).toBeVisible();
  await expect(toast).toHaveCount(0);
});
