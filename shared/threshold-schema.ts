/**
 * The threshold editor's rules, shared by the form (as the person types) and the server action (before it writes):
 * one zod schema, built for the set being edited with what it inherits, so the ordering rules apply to the limits that
 * will actually be in force. Values are canonical (bar, °C); the person's units only shape the messages.
 */
import { z } from "zod";
import {
  alarmSignals,
  alarmSignalSchema,
  limitKey,
  priorityRank,
  prioritySchema,
  signalInfo,
  type AlarmSignal,
  type Limit,
  type Priority,
} from "./alarm-rules";
import { telemetrySchema } from "./telemetry";
import {
  defaultUnits,
  pressureFromBar,
  pressureLabel,
  pressureToBar,
  temperatureDeltaFromC,
  temperatureFromC,
  temperatureLabel,
  temperatureToC,
  type UnitPreference,
} from "./units";

export const scopeTypes = ["model", "compressor"] as const;
export const scopeTypeSchema = z.enum(scopeTypes);
export type ScopeType = z.infer<typeof scopeTypeSchema>;

/** On- and off-delays a limit may have, in seconds. */
export const MAX_DELAY_S = 600;
export const REASON_MIN = 5;
export const REASON_MAX = 500;
/** More limits than any template needs (9 signals × 2 directions × 3 priorities = 54). */
export const MAX_LIMITS = alarmSignals.length * 2 * 3;

// ---- Sensor ranges: the telemetry contract's bounds, read from its schema so the two cannot drift apart ----

type Bounded = { minValue: number | null; maxValue: number | null };
const t = telemetrySchema.shape;
function bounds(s: Bounded): { min: number; max: number } {
  return { min: s.minValue ?? -Infinity, max: s.maxValue ?? Infinity };
}
const stageRange = bounds(t.stageC.unwrap().element.unwrap());

/** The range each signal's sensor can report (bar, °C); a limit outside it could never be crossed. */
export const signalRange: Record<AlarmSignal, { min: number; max: number }> = {
  deliveryBar: bounds(t.deliveryBar),
  finalStageC: stageRange,
  stage1C: stageRange,
  stage2C: stageRange,
  stage3C: stageRange,
  stage4C: stageRange,
  oilBar: bounds(t.oilBar.unwrap().unwrap()),
  purifierC: bounds(t.purifierC.unwrap().unwrap()),
  intakeC: bounds(t.intakeC.unwrap().unwrap()),
};

// ---- Units: values and deadbands shown in the person's units, stored in bar and °C ----

export function temperatureDeltaToC(delta: number, unit: UnitPreference["temperatureUnit"]): number {
  return unit === "C" ? delta : delta / 1.8;
}

export function unitOf(signal: AlarmSignal, units: UnitPreference): string {
  return signalInfo[signal].kind === "pressure" ? pressureLabel(units.pressureUnit) : temperatureLabel(units.temperatureUnit);
}

/** A stored limit value (bar or °C) in the person's unit. */
export function valueToDisplay(signal: AlarmSignal, v: number, units: UnitPreference): number {
  return signalInfo[signal].kind === "pressure" ? pressureFromBar(v, units.pressureUnit) : temperatureFromC(v, units.temperatureUnit);
}

export function valueFromDisplay(signal: AlarmSignal, v: number, units: UnitPreference): number {
  return round(signalInfo[signal].kind === "pressure" ? pressureToBar(v, units.pressureUnit) : temperatureToC(v, units.temperatureUnit));
}

/** A deadband is a difference: a temperature deadband converts without the offset (5 K = 9 °F). */
export function deadbandToDisplay(signal: AlarmSignal, d: number, units: UnitPreference): number {
  return signalInfo[signal].kind === "pressure" ? pressureFromBar(d, units.pressureUnit) : temperatureDeltaFromC(d, units.temperatureUnit);
}

export function deadbandFromDisplay(signal: AlarmSignal, d: number, units: UnitPreference): number {
  return round(signalInfo[signal].kind === "pressure" ? pressureToBar(d, units.pressureUnit) : temperatureDeltaToC(d, units.temperatureUnit));
}

/** Stored values keep 6 significant decimals: enough for any unit shown, without 0.30000000000000004 in the audit. */
function round(v: number): number {
  return Number.isFinite(v) ? Math.round(v * 1e6) / 1e6 : v;
}

/** Decimals an input shows in each unit. */
export function inputDecimals(signal: AlarmSignal, units: UnitPreference): number {
  if (signalInfo[signal].kind === "temperature") return 1;
  return units.pressureUnit === "psi" ? 1 : units.pressureUnit === "MPa" ? 3 : 2;
}

/** A number as an input shows it: fixed decimals with trailing zeros dropped ("160", "2.5", "4350.5"). */
export function formatInput(v: number, decimals: number): string {
  return String(Number(v.toFixed(decimals)));
}

export function formatValue(signal: AlarmSignal, v: number, units: UnitPreference): string {
  return `${formatInput(valueToDisplay(signal, v, units), inputDecimals(signal, units))} ${unitOf(signal, units)}`;
}

export function formatDeadband(signal: AlarmSignal, d: number, units: UnitPreference): string {
  return `${formatInput(deadbandToDisplay(signal, d, units), inputDecimals(signal, units))} ${unitOf(signal, units)}`;
}

// ---- Rows and sets ----

export const directionSchema = z.enum(["high", "low"]);

/** One limit of a set as stored: for a compressor, enabled = false switches the inherited limit off. */
export type ThresholdRow = Limit & { enabled: boolean };

const finite = (what: string) =>
  z.number({ error: `Enter the ${what} as a number` }).refine(Number.isFinite, { message: `Enter the ${what} as a number` });

const delay = (what: string) =>
  finite(what)
    .refine((v) => Number.isInteger(v), { message: "Whole seconds" })
    .refine((v) => v >= 0 && v <= MAX_DELAY_S, { message: `Between 0 and ${MAX_DELAY_S} s` });

export function thresholdRowSchema(units: UnitPreference = defaultUnits) {
  return z
    .object({
      signal: alarmSignalSchema,
      direction: directionSchema,
      priority: prioritySchema,
      value: finite("limit"),
      deadband: finite("deadband").refine((v) => v >= 0, { message: "The deadband cannot be negative" }),
      onDelayS: delay("on-delay"),
      offDelayS: delay("off-delay"),
      enabled: z.boolean(),
    })
    .superRefine((r, ctx) => {
      const range = signalRange[r.signal];
      if (Number.isFinite(r.value) && (r.value < range.min || r.value > range.max)) {
        ctx.addIssue({
          code: "custom",
          path: ["value"],
          message: `Outside the sensor's range, ${formatValue(r.signal, range.min, units)} to ${formatValue(r.signal, range.max, units)}`,
        });
      }
    });
}

const priorityWord: Record<Priority, string> = { critical: "critical", warning: "warning", advisory: "advisory" };

export type SetContext = {
  scopeType: ScopeType;
  /** For a compressor: the model template's rows it inherits. */
  inherited?: readonly ThresholdRow[];
  units?: UnitPreference;
};

type Entry = { limit: ThresholdRow; own: number | null };

/**
 * The cross-limit rules over what will be in force (the template merged with the compressor's rows):
 * - for one signal and direction, critical lies beyond warning and warning beyond advisory (higher for a high limit,
 *   lower for a low one);
 * - every high limit lies above every low limit of the same signal;
 * - a deadband is smaller than the gap to the next limit it falls back towards (else the alarm could not clear
 *   before another limit takes over);
 * - one row per signal, direction and priority; a compressor can only switch off what it inherits; a template
 *   removes a limit rather than switching it off.
 * Each problem is reported at the field of the set's own row; a rule broken only by inherited rows is not this set's.
 */
export function checkSet(rows: readonly ThresholdRow[], ctx: SetContext): { path: (string | number)[]; message: string }[] {
  const units = ctx.units ?? defaultUnits;
  const problems: { path: (string | number)[]; message: string }[] = [];
  const at = (i: number, field: string, message: string) => problems.push({ path: ["limits", i, field], message });
  const fmt = (l: Limit) => formatValue(l.signal, l.value, units);
  const name = (l: Limit) => `${priorityWord[l.priority]} ${l.direction} limit`;

  const seen = new Map<string, number>();
  rows.forEach((r, i) => {
    const key = limitKey(r);
    if (seen.has(key)) at(i, "priority", "This signal already has a limit of this direction and priority");
    else seen.set(key, i);
  });

  const inheritedByKey = new Map<string, ThresholdRow>();
  for (const r of ctx.inherited ?? []) if (r.enabled) inheritedByKey.set(limitKey(r), r);
  rows.forEach((r, i) => {
    if (r.enabled) return;
    if (ctx.scopeType === "model") at(i, "enabled", "Remove the limit from the template instead of switching it off");
    else if (!inheritedByKey.has(limitKey(r))) at(i, "enabled", "Nothing is inherited here to switch off");
  });

  // What will be in force: inherited rows, replaced or removed by the set's own.
  const effective = new Map<string, Entry>();
  for (const [key, r] of inheritedByKey) effective.set(key, { limit: r, own: null });
  rows.forEach((r, i) => {
    const key = limitKey(r);
    if (seen.get(key) !== i) return;
    if (r.enabled) effective.set(key, { limit: r, own: i });
    else effective.delete(key);
  });

  const bySignal = new Map<AlarmSignal, Entry[]>();
  for (const e of effective.values()) {
    if (!Number.isFinite(e.limit.value)) continue;
    let list = bySignal.get(e.limit.signal);
    if (!list) bySignal.set(e.limit.signal, (list = []));
    list.push(e);
  }

  for (const list of bySignal.values()) {
    // Severity order within each direction: advisory, then warning, then critical.
    for (const direction of ["high", "low"] as const) {
      const chain = list
        .filter((e) => e.limit.direction === direction)
        .sort((a, b) => priorityRank[b.limit.priority] - priorityRank[a.limit.priority]);
      for (let k = 1; k < chain.length; k++) {
        const lesser = chain[k - 1]!;
        const graver = chain[k]!;
        const ok = direction === "high" ? graver.limit.value > lesser.limit.value : graver.limit.value < lesser.limit.value;
        if (ok) continue;
        const word = direction === "high" ? "above" : "below";
        const other = direction === "high" ? "below" : "above";
        if (graver.own !== null) at(graver.own, "value", `Must be ${word} the ${name(lesser.limit)} (${fmt(lesser.limit)})`);
        if (lesser.own !== null) at(lesser.own, "value", `Must be ${other} the ${name(graver.limit)} (${fmt(graver.limit)})`);
      }
    }

    const highs = list.filter((e) => e.limit.direction === "high");
    const lows = list.filter((e) => e.limit.direction === "low");
    for (const h of highs) {
      for (const l of lows) {
        if (h.limit.value > l.limit.value) continue;
        if (h.own !== null) at(h.own, "value", `A high limit must be above the ${name(l.limit)} (${fmt(l.limit)})`);
        if (l.own !== null) at(l.own, "value", `A low limit must be below the ${name(h.limit)} (${fmt(h.limit)})`);
      }
    }

    // Deadband against the nearest other limit on the side the value returns to.
    for (const e of list) {
      const { limit } = e;
      if (!Number.isFinite(limit.deadband) || limit.deadband < 0) continue;
      let next: Entry | null = null;
      for (const o of list) {
        // A graver limit of the same direction on the return side is an ordering error, reported above.
        if (o === e || (o.limit.direction === limit.direction && priorityRank[o.limit.priority] < priorityRank[limit.priority])) continue;
        const beyondReturn = limit.direction === "high" ? o.limit.value < limit.value : o.limit.value > limit.value;
        if (!beyondReturn) continue;
        if (!next || Math.abs(o.limit.value - limit.value) < Math.abs(next.limit.value - limit.value)) next = o;
      }
      if (!next) continue;
      const gap = Math.abs(limit.value - next.limit.value);
      if (limit.deadband < gap) continue;
      const gapText = formatDeadband(limit.signal, gap, units);
      if (e.own !== null) {
        at(e.own, "deadband", `Must be smaller than the ${gapText} gap to the ${name(next.limit)} (${fmt(next.limit)})`);
      } else if (next.own !== null) {
        at(next.own, "value", `Too close to the inherited ${name(limit)}: its ${formatDeadband(limit.signal, limit.deadband, units)} deadband reaches past this value`);
      }
    }
  }
  return problems;
}

const base = {
  scopeType: scopeTypeSchema,
  scopeId: z.number().int().positive(),
};

/** The set being saved: every limit of one template or one compressor, the version it was based on, and why. */
export function thresholdSaveSchema(ctx: SetContext) {
  return z
    .object({
      ...base,
      baseVersion: z.number().int().min(0),
      reason: z
        .string()
        .trim()
        .min(REASON_MIN, `Say why, in at least ${REASON_MIN} characters`)
        .max(REASON_MAX, `At most ${REASON_MAX} characters`),
      limits: z.array(thresholdRowSchema(ctx.units)).max(MAX_LIMITS),
    })
    .superRefine((d, c) => {
      if (d.scopeType !== ctx.scopeType) c.addIssue({ code: "custom", path: ["scopeType"], message: "Wrong kind of set" });
      for (const problem of checkSet(d.limits, ctx)) c.addIssue({ code: "custom", ...problem });
    });
}
export type ThresholdSaveInput = z.infer<ReturnType<typeof thresholdSaveSchema>>;

/** What the form sends before the server knows the set (scope only), to pick the context to validate against. */
export const thresholdScopeSchema = z.object(base);
export type ThresholdScope = z.infer<typeof thresholdScopeSchema>;

export const thresholdRevertSchema = z.object({
  auditId: z.number().int().positive(),
  baseVersion: z.number().int().min(0),
});
export type ThresholdRevertInput = z.infer<typeof thresholdRevertSchema>;

/** Field errors keyed by their full path ("limits.3.deadband", "reason"), so each lands at its own input. */
export function fieldErrorsByPath(error: z.ZodError): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const problem of error.issues) {
    const key = problem.path.map(String).join(".") || "_form";
    (out[key] ??= []).push(problem.message);
  }
  return out;
}

/** The rows of a set in a stable order (for diffs, audit entries and display). */
export function sortRows<T extends Limit>(rows: readonly T[]): T[] {
  const order = new Map<string, number>(alarmSignals.map((s, i) => [s, i]));
  return [...rows].sort(
    (a, b) =>
      (order.get(a.signal) ?? 99) - (order.get(b.signal) ?? 99) ||
      (a.direction === b.direction ? 0 : a.direction === "high" ? -1 : 1) ||
      priorityRank[b.priority] - priorityRank[a.priority],
  );
}

export type RowChange = {
  key: string;
  kind: "added" | "removed" | "changed";
  fields: { field: keyof ThresholdRow; before: number | boolean | null; after: number | boolean | null }[];
};

const compared: (keyof ThresholdRow)[] = ["value", "deadband", "onDelayS", "offDelayS", "enabled"];

/** Row-by-row differences between two versions of a set. */
export function diffRows(before: readonly ThresholdRow[], after: readonly ThresholdRow[]): RowChange[] {
  const a = new Map(before.map((r) => [limitKey(r), r]));
  const b = new Map(after.map((r) => [limitKey(r), r]));
  const out: RowChange[] = [];
  for (const r of sortRows([...before, ...after.filter((x) => !a.has(limitKey(x)))])) {
    const key = limitKey(r);
    const x = a.get(key);
    const y = b.get(key);
    if (x && !y) out.push({ key, kind: "removed", fields: compared.map((f) => ({ field: f, before: x[f] as number | boolean, after: null })) });
    else if (!x && y) out.push({ key, kind: "added", fields: compared.map((f) => ({ field: f, before: null, after: y[f] as number | boolean })) });
    else if (x && y) {
      const fields = compared.filter((f) => x[f] !== y[f]).map((f) => ({ field: f, before: x[f] as number | boolean, after: y[f] as number | boolean }));
      if (fields.length) out.push({ key, kind: "changed", fields });
    }
  }
  return out;
}

// ---- What the pages and routes exchange ----

export type ThresholdSetDto = {
  scopeType: ScopeType;
  scopeId: number;
  label: string;
  version: number;
  updatedAt: number | null;
  updatedByName: string | null;
  /** The set's own rows. */
  rows: ThresholdRow[];
  /** Compressor: the model's template rows it inherits; model: []. */
  inherited: ThresholdRow[];
  model: { id: number; name: string; stages: number; ratedPressureBar: number };
  /** Compressor: itself; model: every compressor of the model the person may see (backtest candidates). */
  compressors: { id: number; name: string; siteName: string; timeZone: string }[];
  /** Why this person may not save this set, if they may not. */
  readOnlyReason: string | null;
};

export type ThresholdOverviewDto = {
  models: {
    id: number;
    name: string;
    stages: number;
    limits: number;
    compressors: { id: number; name: string; siteName: string; overrides: number }[];
  }[];
};

export type ThresholdHistoryEntry = {
  id: number;
  ts: number;
  actor: string;
  reason: string;
  fromVersion: number | null;
  toVersion: number | null;
  revertOf: number | null;
  changes: RowChange[];
  before: ThresholdRow[];
  after: ThresholdRow[];
};

export const signalOptions = alarmSignals.map((s) => ({ value: s, label: signalInfo[s].label }));
