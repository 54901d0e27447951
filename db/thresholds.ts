import type { Statement } from "better-sqlite3";
import { and, eq } from "drizzle-orm";
import { alarmSignals, limitKey, limitSchema, priorityRank, type Limit } from "@/shared/alarm-rules";
import type { Db } from "./client";
import { compressors, thresholdLimits, type ThresholdLimitRow } from "./schema";

type LimitRowLike = Pick<
  ThresholdLimitRow,
  "signal" | "direction" | "priority" | "value" | "deadband" | "onDelayS" | "offDelayS" | "enabled"
>;

const signalOrder = new Map<string, number>(alarmSignals.map((s, i) => [s, i]));

/** Evaluation and display order: by signal, high before low, advisory → warning → critical (the order a rising value crosses them). */
export function compareLimits(a: Limit, b: Limit): number {
  return (
    (signalOrder.get(a.signal) ?? 99) - (signalOrder.get(b.signal) ?? 99) ||
    (a.direction === b.direction ? 0 : a.direction === "high" ? -1 : 1) ||
    priorityRank[b.priority] - priorityRank[a.priority]
  );
}

function toLimit(r: LimitRowLike): Limit | null {
  const parsed = limitSchema.safeParse({
    signal: r.signal,
    direction: r.direction,
    priority: r.priority,
    value: r.value,
    deadband: r.deadband,
    onDelayS: r.onDelayS,
    offDelayS: r.offDelayS,
  });
  return parsed.success ? parsed.data : null;
}

/**
 * The model's template overridden by the compressor's own limits, matched on signal + direction + priority.
 * A compressor row with enabled = false removes the inherited limit; a disabled template row applies to nobody.
 * Rows that do not validate (unknown signal, negative deadband) are left out.
 */
export function mergeLimits(template: readonly LimitRowLike[], overrides: readonly LimitRowLike[]): Limit[] {
  const byKey = new Map<string, Limit>();
  for (const r of template) {
    const l = r.enabled ? toLimit(r) : null;
    if (l) byKey.set(limitKey(l), l);
  }
  for (const r of overrides) {
    const key = limitKey({ signal: r.signal as Limit["signal"], direction: r.direction, priority: r.priority });
    byKey.delete(key);
    const l = r.enabled ? toLimit(r) : null;
    if (l) byKey.set(key, l);
  }
  return [...byKey.values()].sort(compareLimits);
}

const limitColumns = {
  scopeType: thresholdLimits.scopeType,
  scopeId: thresholdLimits.scopeId,
  signal: thresholdLimits.signal,
  direction: thresholdLimits.direction,
  priority: thresholdLimits.priority,
  value: thresholdLimits.value,
  deadband: thresholdLimits.deadband,
  onDelayS: thresholdLimits.onDelayS,
  offDelayS: thresholdLimits.offDelayS,
  enabled: thresholdLimits.enabled,
};

/** The limits that apply to one compressor now; [] for an unknown compressor. */
export function effectiveLimits(db: Db, compressorId: number): Limit[] {
  const c = db.select({ modelId: compressors.modelId }).from(compressors).where(eq(compressors.id, compressorId)).get();
  if (!c) return [];
  const template = db
    .select(limitColumns)
    .from(thresholdLimits)
    .where(and(eq(thresholdLimits.scopeType, "model"), eq(thresholdLimits.scopeId, c.modelId)))
    .all();
  const own = db
    .select(limitColumns)
    .from(thresholdLimits)
    .where(and(eq(thresholdLimits.scopeType, "compressor"), eq(thresholdLimits.scopeId, compressorId)))
    .all();
  return mergeLimits(template, own);
}

/** Effective limits of every compressor (two queries), keyed by compressor id. */
export function allEffectiveLimits(db: Db): Map<number, Limit[]> {
  const rows = db.select(limitColumns).from(thresholdLimits).all();
  const byModel = new Map<number, LimitRowLike[]>();
  const byCompressor = new Map<number, LimitRowLike[]>();
  for (const r of rows) {
    const m = r.scopeType === "model" ? byModel : byCompressor;
    let list = m.get(r.scopeId);
    if (!list) m.set(r.scopeId, (list = []));
    list.push(r);
  }
  const out = new Map<number, Limit[]>();
  for (const c of db.select({ id: compressors.id, modelId: compressors.modelId }).from(compressors).all()) {
    out.set(c.id, mergeLimits(byModel.get(c.modelId) ?? [], byCompressor.get(c.id) ?? []));
  }
  return out;
}

const versionSql = `SELECT
  (SELECT count(*) || ':' || coalesce(max(id), 0) || ':' || coalesce(max(updated_at), 0) || ':' ||
          total(value * id) || ':' || total(deadband * id) || ':' || total((on_delay_s + 3 * off_delay_s) * id) || ':' ||
          total(enabled * id) || ':' || total(scope_id * id) || ':' ||
          total((length(signal) + unicode(direction) * 100 + unicode(priority) * 10000 + (scope_type = 'model') * 1000000) * id)
   FROM threshold_limits) AS limits,
  (SELECT count(*) || ':' || coalesce(sum(version), 0) || ':' || coalesce(max(updated_at), 0) FROM threshold_sets) AS sets,
  (SELECT count(*) || ':' || total(model_id * id) || ':' || coalesce(max(updated_at), 0) FROM compressors) AS units`;

const versionStatements = new WeakMap<object, Statement>();

/**
 * A cheap fingerprint of everything effective limits depend on: every threshold row (count, newest change, weighted sums
 * of values, delays, switches and keys), the set versions, and which model each compressor belongs to. Small tables,
 * one statement: compare it every second or so and reload when it differs.
 */
export function thresholdsVersion(db: Db): string {
  let stmt = versionStatements.get(db.$client);
  if (!stmt) versionStatements.set(db.$client, (stmt = db.$client.prepare(versionSql)));
  const row = stmt.get() as { limits: string; sets: string; units: string };
  return `${row.limits}|${row.sets}|${row.units}`;
}
