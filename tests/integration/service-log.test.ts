import { and, eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { plannedServiceIntervals } from "@/db/reports";
import { alarms, auditLog, compressors, compressorState, events, serviceTasks } from "@/db/schema";
import { serviceDueList } from "@/db/service";
import { syncServiceAlarms } from "@/lib/service/alarms";
import { addServiceWindow, correctServiceEntry, recordServiceLog, saveServiceTask } from "@/lib/service/log";
import { openWorld, tempDir } from "./notify-fixtures";

// The service log end to end on a real SQLite file: plan → overdue → alarm → logged → interval restarted → alarm
// cleared; duplicate submits, scope, corrections and planned windows that the monthly report counts.

const tmp = tempDir("airkeep-service-");
afterAll(() => tmp.remove());
const DAY = 86_400_000;
const now = Date.UTC(2026, 5, 10, 12, 0, 0);
const tech = { id: 1, name: "Tess Technician", email: "tess@airkeep.demo", siteIds: null as number[] | null };

function world(name: string) {
  const w = openWorld(tmp.file(name), now - 400 * DAY);
  const modelId = w.db.select({ m: compressors.modelId }).from(compressors).where(eq(compressors.id, w.mb1)).get()!.m;
  const add = (code: string, name: string, everyHours: number | null, everyMonths: number | null) =>
    w.db.insert(serviceTasks).values({ scopeType: "model", scopeId: modelId, code, name, everyHours, everyMonths, updatedAt: now }).run();
  add("oil-change", "Oil change", 500, 12);
  add("safety-valve-test", "Safety-valve test", null, 12);
  w.db.update(compressorState).set({ hourMeterH: 1200 }).run();
  return { ...w, modelId };
}

const openServiceAlarms = (db: ReturnType<typeof world>["db"], compressorId: number) =>
  db
    .select({ key: alarms.key, priority: alarms.priority, active: alarms.active })
    .from(alarms)
    .where(and(eq(alarms.compressorId, compressorId), eq(alarms.active, true)))
    .all()
    .filter((a) => a.key.startsWith("cond:service"));

describe("service log", () => {
  it("an overdue task raises a warning; logging it restarts the interval and clears the alarm", () => {
    const w = world("a.db");
    // Never logged since the compressor was added 400 days ago: the yearly test is overdue; oil at 1,200 h of 500 too.
    syncServiceAlarms(w.db, now);
    expect(openServiceAlarms(w.db, w.mb1).map((a) => `${a.key} ${a.priority}`).sort()).toEqual([
      "cond:service-overdue:oil-change warning",
      "cond:service-overdue:safety-valve-test warning",
    ]);
    const r = recordServiceLog(w.db, tech, { submissionId: "sub-00000001", compressorId: w.mb1, tasks: ["safety-valve-test"], doneAt: now - 3600_000, hourMeterH: null, parts: "", notes: "Popped at 450 bar" }, now);
    expect(r.duplicate).toBe(false);
    expect(openServiceAlarms(w.db, w.mb1).map((a) => a.key)).toEqual(["cond:service-overdue:oil-change"]);
    const valve = serviceDueList(w.db, now, null, w.mb1).find((d) => d.code === "safety-valve-test")!;
    expect(valve.status).toBe("ok");
    expect(valve.dueDate).toBe("2027-06-10");
    const text = w.db.select().from(events).where(and(eq(events.kind, "service"), eq(events.action, "service.log"))).get()?.text;
    expect(text).toContain("logged service on MB-1 Main: Safety-valve test");

    // The same submission again (a double click) gives the same entry.
    const again = recordServiceLog(w.db, tech, { submissionId: "sub-00000001", compressorId: w.mb1, tasks: ["safety-valve-test"], doneAt: now - 3600_000, hourMeterH: null, parts: "", notes: "Popped at 450 bar" }, now);
    expect(again).toEqual({ ...r, duplicate: true });
    w.db.$client.close();
  });

  it("refuses another site's compressor, tasks outside the plan and times in the future", () => {
    const w = world("b.db");
    const osloOnly = { ...tech, siteIds: [w.oslo] };
    const base = { submissionId: "sub-00000002", compressorId: w.mb1, tasks: ["oil-change"], doneAt: now - 1000, hourMeterH: 1200, parts: "", notes: "" };
    expect(() => recordServiceLog(w.db, osloOnly, base, now)).toThrow(/No such compressor/);
    expect(() => recordServiceLog(w.db, tech, { ...base, tasks: ["paint-job"] }, now)).toThrow(/Some values/);
    expect(() => recordServiceLog(w.db, tech, { ...base, doneAt: now + 3600_000 }, now)).toThrow(/Some values/);
    w.db.$client.close();
  });

  it("a compressor override replaces the model's interval", () => {
    const w = world("c.db");
    saveServiceTask(w.db, tech, "compressor", w.hr1, { code: "oil-change", name: "Oil change", everyHours: 2000, everyMonths: 24, enabled: true, note: "" }, now);
    recordServiceLog(w.db, tech, { submissionId: "sub-00000003", compressorId: w.hr1, tasks: ["oil-change"], doneAt: now - DAY, hourMeterH: 1000, parts: "", notes: "" }, now);
    recordServiceLog(w.db, tech, { submissionId: "sub-00000004", compressorId: w.mb1, tasks: ["oil-change"], doneAt: now - DAY, hourMeterH: 1000, parts: "", notes: "" }, now);
    const list = serviceDueList(w.db, now, null);
    expect(list.find((d) => d.compressorId === w.hr1 && d.code === "oil-change")?.dueHours).toBe(3000);
    expect(list.find((d) => d.compressorId === w.mb1 && d.code === "oil-change")?.dueHours).toBe(1500);
    w.db.$client.close();
  });

  it("an administrator's correction is audited with before and after", () => {
    const w = world("d.db");
    const r = recordServiceLog(w.db, tech, { submissionId: "sub-00000005", compressorId: w.mb1, tasks: ["oil-change"], doneAt: now - DAY, hourMeterH: 1100, parts: "", notes: "" }, now);
    correctServiceEntry(w.db, tech, { id: r.id, tasks: ["oil-change"], doneAt: now - DAY, hourMeterH: 1180, parts: "Oil 2 l", notes: "", reason: "Meter misread" }, now);
    const audit = w.db.select().from(auditLog).where(eq(auditLog.action, "service.correct")).get()!;
    expect(audit.details).toMatchObject({ reason: "Meter misread", before: { hourMeterH: 1100 }, after: { hourMeterH: 1180 } });
    expect(serviceDueList(w.db, now, null, w.mb1).find((d) => d.code === "oil-change")?.dueHours).toBe(1680);
    w.db.$client.close();
  });

  it("a planned service window is counted by the monthly report and may not overlap another", () => {
    const w = world("e.db");
    const start = now - 5 * DAY;
    const end = start + 6 * 3600_000;
    addServiceWindow(w.db, tech, { compressorId: w.mb1, startAt: start, endAt: end, reason: "Annual service" }, now);
    expect(plannedServiceIntervals(w.db, w.mb1, now - 30 * DAY, now)).toEqual([{ from: start, to: end }]);
    expect(() => addServiceWindow(w.db, tech, { compressorId: w.mb1, startAt: end - 3600_000, endAt: end + 3600_000, reason: "Valves" }, now)).toThrow(/overlaps/);
    w.db.$client.close();
  });
});
