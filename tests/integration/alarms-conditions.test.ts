import { and, eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { alarms, events, mailOutbox } from "@/db/schema";
import { clearConditionAlarm, raiseConditionAlarm, syncConditionAlarms } from "@/db/alarm-conditions";
import { createAlarmEngine } from "@/db/alarm-engine";
import { notifyTick } from "@/lib/notify/notifier";
import { alarmTitle } from "@/shared/alarm-text";
import { openWorld, tempDir, testConfig } from "./notify-fixtures";

// Condition alarms take the limit alarms' lifecycle, event log and e-mail, and the limit engine leaves them alone.

const tmp = tempDir("airkeep-conditions-");
afterAll(() => tmp.remove());
const t0 = Date.UTC(2026, 4, 4, 9, 0, 0);

describe("condition alarms", () => {
  it("raise once, reach the notifier's e-mail, and clear to cleared-unacknowledged", () => {
    const w = openWorld(tmp.file("a.db"), t0);
    const c = { compressorId: w.mb1, family: "service-overdue", subject: "oil-change", priority: "warning" as const, detail: "due at 4,000 h; now 4,012 h" };
    const t = raiseConditionAlarm(w.db, c, t0);
    expect(t).toMatchObject({ from: "normal", to: "active-unacknowledged", priority: "warning", key: "cond:service-overdue:oil-change" });
    expect(raiseConditionAlarm(w.db, c, t0 + 1000)).toBeNull();
    const row = w.db.select().from(alarms).where(eq(alarms.id, t!.alarmId)).get()!;
    expect(alarmTitle(row)).toBe("Service overdue: oil change");
    expect(w.db.select().from(events).where(eq(events.alarmId, row.id)).get()?.text).toBe("MB-1 Main: service overdue: oil change (warning): due at 4,000 h; now 4,012 h");

    // The warning-level on-call rule of the fixture world sends it.
    notifyTick(w.db, testConfig(), t0 + 2000, () => {});
    expect(w.db.select().from(mailOutbox).where(eq(mailOutbox.alarmId, row.id)).all().length).toBeGreaterThan(0);

    const cleared = clearConditionAlarm(w.db, { ...c, detail: "logged by Tess" }, t0 + 60_000);
    expect(cleared).toMatchObject({ from: "active-unacknowledged", to: "cleared-unacknowledged" });
    expect(clearConditionAlarm(w.db, c, t0 + 61_000)).toBeNull();
    w.db.$client.close();
  });

  it("survive the limit engine starting up (it has no limit for them)", () => {
    const w = openWorld(tmp.file("b.db"), t0);
    raiseConditionAlarm(w.db, { compressorId: w.mb1, family: "service-due", subject: "intake-filter", priority: "advisory" }, t0);
    const engine = createAlarmEngine(w.db, { now: () => t0 + 5000, log: () => {} });
    engine.tick(t0 + 6000);
    const open = w.db.select().from(alarms).where(and(eq(alarms.compressorId, w.mb1), eq(alarms.key, "cond:service-due:intake-filter"))).get()!;
    expect(open).toMatchObject({ state: "active-unacknowledged", active: true });
    w.db.$client.close();
  });

  it("sync raises the wanted subjects and clears the rest of the family only", () => {
    const w = openWorld(tmp.file("c.db"), t0);
    raiseConditionAlarm(w.db, { compressorId: w.mb1, family: "service-due", subject: "valves", priority: "advisory" }, t0);
    raiseConditionAlarm(w.db, { compressorId: w.mb1, family: "service-overdue", subject: "valves", priority: "warning" }, t0);
    const out = syncConditionAlarms(w.db, w.mb1, "service-due", [{ subject: "oil-change", priority: "advisory" }], t0 + 1000);
    expect(out.map((t) => `${t.action} ${t.key}`).sort()).toEqual(["alarm.clear cond:service-due:valves", "alarm.raise cond:service-due:oil-change"]);
    const overdue = w.db.select().from(alarms).where(eq(alarms.key, "cond:service-overdue:valves")).get()!;
    expect(overdue.active).toBe(true);
    w.db.$client.close();
  });
});
