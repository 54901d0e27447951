import { limitKey, type AlarmSignal, type Priority } from "@/shared/alarm-rules";
import {
  deadbandFromDisplay,
  deadbandToDisplay,
  formatInput,
  inputDecimals,
  sortRows,
  valueFromDisplay,
  valueToDisplay,
  type ScopeType,
  type ThresholdRow,
} from "@/shared/threshold-schema";
import type { UnitPreference } from "@/shared/units";

// The editor's working copy of a set: what the person typed (in their units), one line per limit, and for a compressor
// what each line inherits. Pure, so the conversions and the rows sent to the server are unit-tested.

export type LineMode = "own" | "inherit" | "off";

export type NumberField = "value" | "deadband" | "onDelayS" | "offDelayS";
export const numberFields: NumberField[] = ["value", "deadband", "onDelayS", "offDelayS"];

export type DraftLine = {
  key: string;
  signal: AlarmSignal;
  direction: "high" | "low";
  priority: Priority;
  /** A compressor's line: "inherit" (no row of its own), "own" (an override or its own limit), "off" (switched off). */
  mode: LineMode;
  /** The typed text of each number, in the person's units. */
  text: Record<NumberField, string>;
  /** What the fields showed when loaded, and the stored values behind them: untouched text keeps its exact value. */
  loaded: { text: Record<NumberField, string>; stored: Record<NumberField, number> } | null;
  inherited: ThresholdRow | null;
};

export type Draft = { scopeType: ScopeType; lines: DraftLine[] };

function displayText(row: Pick<ThresholdRow, "signal" | NumberField>, units: UnitPreference): Record<NumberField, string> {
  const d = inputDecimals(row.signal, units);
  return {
    value: formatInput(valueToDisplay(row.signal, row.value, units), d),
    deadband: formatInput(deadbandToDisplay(row.signal, row.deadband, units), d),
    onDelayS: String(row.onDelayS),
    offDelayS: String(row.offDelayS),
  };
}

function stored(row: Pick<ThresholdRow, NumberField>): Record<NumberField, number> {
  return { value: row.value, deadband: row.deadband, onDelayS: row.onDelayS, offDelayS: row.offDelayS };
}

/** The editor's lines for a set: its own rows, and for a compressor every inherited limit beside them. */
export function draftFrom(scopeType: ScopeType, rows: readonly ThresholdRow[], inherited: readonly ThresholdRow[], units: UnitPreference): Draft {
  const own = new Map(rows.map((r) => [limitKey(r), r]));
  const from = new Map(inherited.filter((r) => r.enabled).map((r) => [limitKey(r), r]));
  const keys = sortRows([...rows, ...[...from.values()].filter((r) => !own.has(limitKey(r)))]);
  const lines = keys.map((k): DraftLine => {
    const key = limitKey(k);
    const mine = own.get(key);
    const parent = from.get(key) ?? null;
    const basis = mine ?? parent!;
    const text = displayText(basis, units);
    return {
      key,
      signal: k.signal,
      direction: k.direction,
      priority: k.priority,
      mode: mine ? (mine.enabled ? "own" : "off") : "inherit",
      text,
      loaded: { text: { ...text }, stored: stored(basis) },
      inherited: parent,
    };
  });
  return { scopeType, lines };
}

/** A number as typed: decimal comma accepted; empty or junk is NaN (the schema then says so at the field). */
export function parseNumber(text: string): number {
  const t = text.trim().replace(",", ".");
  if (t === "" || !/^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(t)) return Number.NaN;
  return Number(t);
}

function canonical(line: DraftLine, field: NumberField, units: UnitPreference): number {
  if (line.loaded && line.text[field] === line.loaded.text[field]) return line.loaded.stored[field];
  const n = parseNumber(line.text[field]);
  if (!Number.isFinite(n)) return n;
  if (field === "value") return valueFromDisplay(line.signal, n, units);
  if (field === "deadband") return deadbandFromDisplay(line.signal, n, units);
  return n;
}

/**
 * The set's own rows as they would be saved (bar, °C), and for each the line it came from (field errors come back as
 * "limits.<index>.<field>").
 */
export function rowsOf(draft: Draft, units: UnitPreference): { rows: ThresholdRow[]; lineOf: string[] } {
  const rows: ThresholdRow[] = [];
  const lineOf: string[] = [];
  for (const line of draft.lines) {
    if (line.mode === "inherit") continue;
    rows.push({
      signal: line.signal,
      direction: line.direction,
      priority: line.priority,
      value: canonical(line, "value", units),
      deadband: canonical(line, "deadband", units),
      onDelayS: canonical(line, "onDelayS", units),
      offDelayS: canonical(line, "offDelayS", units),
      enabled: line.mode === "own",
    });
    lineOf.push(line.key);
  }
  return { rows, lineOf };
}

/** Field errors keyed by line and field ("finalStageC.high.warning" → { value: [...] }), from "limits.3.value" paths. */
export function errorsByLine(fieldErrors: Record<string, string[] | undefined>, lineOf: readonly string[]): Map<string, Record<string, string>> {
  const out = new Map<string, Record<string, string>>();
  for (const [path, messages] of Object.entries(fieldErrors)) {
    const m = /^limits\.(\d+)\.(\w+)$/.exec(path);
    const message = messages?.[0];
    if (!m || !message) continue;
    const key = lineOf[Number(m[1])];
    if (!key) continue;
    const forLine = out.get(key) ?? {};
    forLine[m[2]!] ??= message;
    out.set(key, forLine);
  }
  return out;
}

/** A new line for a limit the set does not have yet: the value to fill in, no deadband or delays. */
export function newLine(signal: AlarmSignal, direction: "high" | "low", priority: Priority): DraftLine {
  const key = limitKey({ signal, direction, priority });
  return {
    key,
    signal,
    direction,
    priority,
    mode: "own",
    text: { value: "", deadband: "0", onDelayS: "0", offDelayS: "0" },
    loaded: null,
    inherited: null,
  };
}

/** A compressor line taking a row of its own, starting from what it inherited. */
export function overrideLine(line: DraftLine, units: UnitPreference): DraftLine {
  if (line.mode === "own") return line;
  const basis = line.inherited;
  if (line.mode === "off" || !basis) return { ...line, mode: "own" };
  const text = displayText(basis, units);
  return { ...line, mode: "own", text, loaded: { text: { ...text }, stored: stored(basis) } };
}

/**
 * The same lines shown in other units (the person switched units mid-edit): every number keeps the value it stood for.
 * A field that does not parse stays as typed.
 */
export function convertDraft(draft: Draft, from: UnitPreference, to: UnitPreference): Draft {
  return {
    ...draft,
    lines: draft.lines.map((line) => {
      const values = {} as Record<NumberField, number>;
      for (const f of numberFields) values[f] = canonical(line, f, from);
      const shown = displayText({ signal: line.signal, ...values }, to);
      const text = { ...line.text };
      for (const f of numberFields) if (Number.isFinite(values[f])) text[f] = shown[f];
      return { ...line, text, loaded: { text: { ...text }, stored: values } };
    }),
  };
}
