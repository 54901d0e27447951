/**
 * Demo service plans for the four demo models, and a service history for each demo compressor.
 *
 * The plans are common practice for small and large multi-stage breathing-air compressors, NOT any maker's schedule:
 * oil changed every few hundred to a thousand run hours or yearly, intake filter twice as often, valves inspected at
 * one to two thousand hours, a monthly check that the condensate drains work, a yearly safety-valve test and a
 * pressure-vessel inspection every two years (the real interval is set by local regulations; from memory). A real
 * installation copies its maker's manual into the plan.
 *
 * History: each compressor's tasks were last done some way into their interval, so the demo shows a spread; MB-1 Main's
 * safety-valve test is overdue and HR-1 Bay compressor's intake filter is coming due. Hour meters of these entries
 * are left empty and filled from the telemetry history once the backfill has written it (lib/service/alarms.ts).
 */
import { and, eq } from "drizzle-orm";
import type { Db } from "./client";
import { demoCompressors } from "./demo-scenario";
import { compressorModels, compressors, serviceLog, serviceTasks, users } from "./schema";

type DemoTask = { code: string; name: string; everyHours: number | null; everyMonths: number | null };

const task = (code: string, name: string, everyHours: number | null, everyMonths: number | null): DemoTask => ({ code, name, everyHours, everyMonths });

/** Common practice, not a maker's schedule (see above). */
export const demoServicePlans: Record<string, DemoTask[]> = {
  "Skua 80": [
    task("oil-change", "Oil change", 250, 12),
    task("intake-filter", "Intake filter", 125, 6),
    task("valve-inspection", "Valve inspection", 500, null),
    task("condensate-drain", "Condensate drain check", null, 1),
    task("safety-valve-test", "Safety-valve test", null, 12),
  ],
  "Petrel 250": [
    task("oil-change", "Oil change", 500, 12),
    task("intake-filter", "Intake filter", 250, 6),
    task("valve-inspection", "Valve inspection", 1000, null),
    task("condensate-drain", "Condensate drain check", null, 1),
    task("safety-valve-test", "Safety-valve test", null, 12),
    task("vessel-inspection", "Pressure-vessel inspection", null, 24),
  ],
  "Gannet 320": [
    task("oil-change", "Oil change", 1000, 12),
    task("intake-filter", "Intake filter", 500, 6),
    task("valve-inspection", "Valve inspection", 2000, null),
    task("condensate-drain", "Condensate drain check", null, 1),
    task("safety-valve-test", "Safety-valve test", null, 12),
    task("vessel-inspection", "Pressure-vessel inspection", null, 24),
  ],
  "Fulmar 450": [
    task("oil-change", "Oil change", 1000, 12),
    task("intake-filter", "Intake filter", 500, 6),
    task("valve-inspection", "Valve inspection", 2000, null),
    task("condensate-drain", "Condensate drain check", null, 1),
    task("safety-valve-test", "Safety-valve test", null, 12),
    task("vessel-inspection", "Pressure-vessel inspection", null, 24),
  ],
};

const DAY = 86_400_000;

/** Days ago each task was last done, as a fraction of its calendar interval (about 30 days a month). */
const spread = [0.35, 0.55, 0.2, 0.7, 0.45, 0.6, 0.3];
const special: Record<string, Record<string, number>> = {
  // Overdue by the calendar: a yearly test last done 13 months ago.
  "mb-main": { "safety-valve-test": 395 },
  // Coming due: a 6-monthly filter done 5 months and 3 weeks ago.
  "hr-bay": { "intake-filter": 174 },
};

export function seedDemoService(db: Db, now = Date.now()): { tasks: number; entries: number } {
  let tasks = 0;
  let entries = 0;
  db.transaction(
    (tx) => {
      for (const [modelName, plan] of Object.entries(demoServicePlans)) {
        const model = tx.select({ id: compressorModels.id }).from(compressorModels).where(eq(compressorModels.name, modelName)).get();
        if (!model) continue;
        const has = tx.select({ id: serviceTasks.id }).from(serviceTasks).where(and(eq(serviceTasks.scopeType, "model"), eq(serviceTasks.scopeId, model.id))).get();
        if (has) continue;
        for (const t of plan) {
          tx.insert(serviceTasks)
            .values({ scopeType: "model", scopeId: model.id, ...t, note: "Demo plan: common practice, not a maker's schedule", updatedAt: now })
            .run();
          tasks++;
        }
      }
      const tech = tx.select({ id: users.id, name: users.name }).from(users).where(eq(users.role, "technician")).get();
      demoCompressors.forEach((dc, i) => {
        const c = tx.select({ id: compressors.id, siteId: compressors.siteId }).from(compressors).where(eq(compressors.deviceId, dc.deviceId)).get();
        if (!c || tx.select({ id: serviceLog.id }).from(serviceLog).where(eq(serviceLog.compressorId, c.id)).get()) return;
        const plan = demoServicePlans[dc.model] ?? [];
        // One entry per task and day; tasks falling on the same day share an entry, as one visit.
        const byDay = new Map<number, DemoTask[]>();
        plan.forEach((t, j) => {
          const months = t.everyMonths ?? 6;
          const days = special[dc.deviceId]?.[t.code] ?? Math.max(3, Math.round(months * 30 * spread[(i + j) % spread.length]!));
          const list = byDay.get(days) ?? [];
          list.push(t);
          byDay.set(days, list);
        });
        for (const [days, list] of byDay) {
          const doneAt = Math.floor((now - days * DAY) / 3_600_000) * 3_600_000 + 10 * 3_600_000 - (days % 3) * 3_600_000;
          tx.insert(serviceLog)
            .values({
              compressorId: c.id,
              siteId: c.siteId,
              doneAt: Math.min(doneAt, now - DAY),
              hourMeterH: null,
              tasks: list.map((t) => ({ code: t.code, name: t.name })),
              parts: list.some((t) => t.code === "oil-change") ? "Compressor oil 2 l" : list.some((t) => t.code === "intake-filter") ? "Intake filter element" : "",
              notes: "Demo history",
              performedBy: tech?.id ?? null,
              performedByName: tech?.name ?? "Demo technician",
              submissionId: `demo-${dc.deviceId}-${days}`,
              createdAt: now,
            })
            .run();
          entries++;
        }
      });
    },
    { behavior: "immediate" },
  );
  return { tasks, entries };
}
