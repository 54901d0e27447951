"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useEffect, useId, useMemo, useRef, useState, type FormEvent } from "react";
import { revertThresholds, saveThresholds } from "@/lib/actions/thresholds";
import { alarmSignals, limitKey, priorities, signalInfo, type AlarmSignal, type Priority } from "@/shared/alarm-rules";
import {
  diffRows,
  fieldErrorsByPath,
  MAX_DELAY_S,
  REASON_MIN,
  thresholdSaveSchema,
  unitOf,
  type RowChange,
  type ScopeType,
  type ThresholdRow,
  type ThresholdSetDto,
} from "@/shared/threshold-schema";
import type { UnitPreference } from "@/shared/units";
import { buttonClass, FieldError, FormAlert, StatusLine } from "../admin/form-kit";
import { thresholdQueries, thresholdsKey } from "../queries/thresholds";
import { useUnits } from "../use-units";
import { BacktestPanel, type BacktestRun } from "./backtest-panel";
import { convertDraft, draftFrom, errorsByLine, newLine, numberFields, overrideLine, rowsOf, type Draft, type DraftLine, type NumberField } from "./draft";
import { HistoryTab } from "./history-tab";
import { PriorityMark, priorityWord } from "./priority-mark";
import { lineLabel, rowText } from "./text";

const fieldLabel: Record<NumberField, string> = { value: "Limit", deadband: "Deadband", onDelayS: "On-delay", offDelayS: "Off-delay" };

type Tab = "limits" | "history";

/** The thresholds of one template or compressor: the editor with its backtest, and the history of changes. */
export function SetEditor({ scopeType, scopeId }: { scopeType: ScopeType; scopeId: number }) {
  const [tab, setTab] = useState<Tab>("limits");
  const id = useId();
  const q = useQuery(thresholdQueries.set(scopeType, scopeId));
  if (!q.data) return <p className="text-muted">{q.error ? q.error.message : "Loading…"}</p>;
  const set = q.data;
  return (
    <div className="space-y-3">
      <header className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <h2 className="text-xl font-semibold" data-testid="set-title">
          {set.label}
        </h2>
        <p className="text-sm text-muted">
          {scopeType === "compressor" ? `${set.compressors[0]?.siteName ?? ""} · model ${set.model.name} · ` : `${set.compressors.length} compressor(s) of yours use it · `}
          version <span className="num" data-testid="set-version">{set.version}</span>
          {set.updatedByName ? `, last saved by ${set.updatedByName}` : ""}
        </p>
      </header>
      <div role="tablist" aria-label="Thresholds" className="flex gap-1 border-b border-line">
        {(["limits", "history"] as const).map((t) => (
          <button
            key={t}
            type="button"
            role="tab"
            id={`${id}-${t}`}
            aria-controls={`${id}-${t}-panel`}
            aria-selected={tab === t}
            onClick={() => setTab(t)}
            className={`-mb-px rounded-t border px-3 py-1 text-sm ${tab === t ? "border-line border-b-raised bg-raised font-semibold" : "border-transparent text-muted hover:text-ink"}`}
          >
            {t === "limits" ? "Limits" : "History"}
          </button>
        ))}
      </div>
      <div role="tabpanel" id={`${id}-limits-panel`} aria-labelledby={`${id}-limits`} hidden={tab !== "limits"}>
        <LimitsForm set={set} scopeType={scopeType} scopeId={scopeId} />
      </div>
      <div role="tabpanel" id={`${id}-history-panel`} aria-labelledby={`${id}-history`} hidden={tab !== "history"}>
        {tab === "history" && <HistoryTab set={set} scopeType={scopeType} scopeId={scopeId} onRevert={revertThresholds} />}
      </div>
    </div>
  );
}

function LimitsForm({ set, scopeType, scopeId }: { set: ThresholdSetDto; scopeType: ScopeType; scopeId: number }) {
  const units = useUnits();
  const queryClient = useQueryClient();
  const id = useId();
  const formRef = useRef<HTMLFormElement>(null);
  /** The version the edits are based on (the live query may move past it when someone else saves). */
  const [base, setBase] = useState<ThresholdSetDto>(set);
  const [draft, setDraft] = useState<Draft>(() => draftFrom(scopeType, set.rows, set.inherited, units));
  const [reason, setReason] = useState("");
  const [touched, setTouched] = useState<ReadonlySet<string>>(new Set());
  const [submitted, setSubmitted] = useState(false);
  const [serverErrors, setServerErrors] = useState<Record<string, string[]>>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [refusal, setRefusal] = useState<string | null>(null);
  const [status, setStatus] = useState<string | null>(null);
  const [pending, setPending] = useState(false);
  const [lastRun, setLastRun] = useState<BacktestRun | null>(null);
  const [focusTick, setFocusTick] = useState(0);

  const { rows, lineOf } = useMemo(() => rowsOf(draft, units), [draft, units]);
  const rowsKey = useMemo(() => JSON.stringify(rows), [rows]);
  const changes = useMemo(() => diffRows(base.rows, rows), [base.rows, rows]);
  const parsed = useMemo(
    () =>
      thresholdSaveSchema({ scopeType, inherited: base.inherited, units }).safeParse({
        scopeType,
        scopeId,
        baseVersion: base.version,
        reason,
        limits: rows,
      }),
    [scopeType, scopeId, base, reason, rows, units],
  );
  const clientErrors = parsed.success ? {} : fieldErrorsByPath(parsed.error);
  const limitsValid = !Object.keys(clientErrors).some((k) => k.startsWith("limits"));
  const byLine = errorsByLine({ ...clientErrors }, lineOf);
  const serverByLine = errorsByLine(serverErrors, lineOf);
  const newer = set.version !== base.version;
  const readOnly = set.readOnlyReason;
  const backtested = lastRun !== null && lastRun.rowsKey === rowsKey;

  // Someone saved (this person elsewhere, a revert, a colleague): an untouched form simply follows.
  if (set.version !== base.version && changes.length === 0 && reason === "") {
    setBase(set);
    setDraft(draftFrom(scopeType, set.rows, set.inherited, units));
    setRefusal(null);
  }

  // Units switched while editing: the typed numbers follow, standing for the same values.
  const shownUnits = useRef(units);
  useEffect(() => {
    if (shownUnits.current === units) return;
    const from = shownUnits.current;
    shownUnits.current = units;
    setDraft((d) => convertDraft(d, from, units));
  }, [units]);

  useEffect(() => {
    if (!focusTick) return;
    formRef.current?.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus();
  }, [focusTick]);

  // Rules between limits put errors on lines the person did not touch: once any limit is edited, all are shown.
  const limitsTouched = submitted || [...touched].some((k) => k !== "reason");
  const errorAt = (line: DraftLine, field: string): string | undefined =>
    serverByLine.get(line.key)?.[field] ?? (limitsTouched ? byLine.get(line.key)?.[field] : undefined);
  const reasonError = serverErrors.reason?.[0] ?? (submitted || touched.has("reason") ? clientErrors.reason?.[0] : undefined);

  function touch(key: string) {
    setTouched((t) => (t.has(key) ? t : new Set(t).add(key)));
    setServerErrors((e) => (Object.keys(e).length ? {} : e));
  }

  function updateLine(key: string, fn: (l: DraftLine) => DraftLine) {
    setDraft((d) => ({ ...d, lines: d.lines.map((l) => (l.key === key ? fn(l) : l)) }));
  }

  function setText(line: DraftLine, field: NumberField, text: string) {
    updateLine(line.key, (l) => ({ ...l, text: { ...l.text, [field]: text } }));
    touch(`${line.key}.${field}`);
  }

  function setMode(line: DraftLine, mode: "own" | "inherit" | "off" | "remove") {
    if (mode === "remove") setDraft((d) => ({ ...d, lines: d.lines.filter((l) => l.key !== line.key) }));
    else if (mode === "own") updateLine(line.key, (l) => overrideLine(l, units));
    else updateLine(line.key, (l) => ({ ...l, mode }));
    touch(`${line.key}.*`);
  }

  function addLine(signal: AlarmSignal, direction: "high" | "low", priority: Priority) {
    const key = limitKey({ signal, direction, priority });
    const existing = draft.lines.find((l) => l.key === key);
    if (existing) {
      if (existing.mode !== "own") setMode(existing, "own");
      return;
    }
    setDraft((d) => ({ ...d, lines: [...d.lines, newLine(signal, direction, priority)] }));
    touch(`${key}.*`);
  }

  function startOver(from: ThresholdSetDto) {
    setBase(from);
    setDraft(draftFrom(scopeType, from.rows, from.inherited, units));
    setTouched(new Set());
    setSubmitted(false);
    setServerErrors({});
    setFormError(null);
    setRefusal(null);
  }

  async function save(e: FormEvent) {
    e.preventDefault();
    setSubmitted(true);
    setStatus(null);
    if (!parsed.success) {
      setFormError("Some values need correcting.");
      setFocusTick((n) => n + 1);
      return;
    }
    setPending(true);
    setFormError(null);
    try {
      const res = await saveThresholds({ scopeType, scopeId, baseVersion: base.version, reason, limits: rows });
      if (res.ok) {
        setStatus(
          `Saved as version ${res.data.version} (${res.data.changes.length} change${res.data.changes.length === 1 ? "" : "s"}). The alarm engine applies it within about a second.`,
        );
        const fresh = await queryClient.fetchQuery({ ...thresholdQueries.set(scopeType, scopeId), staleTime: 0 });
        startOver(fresh);
        setReason("");
        setLastRun(null);
        void queryClient.invalidateQueries({ queryKey: thresholdsKey });
        return;
      }
      if (res.status === 409) {
        setRefusal(res.error);
        await queryClient.refetchQueries({ queryKey: thresholdQueries.set(scopeType, scopeId).queryKey });
        return;
      }
      setServerErrors(res.fieldErrors ?? {});
      setFormError(res.error);
      setFocusTick((n) => n + 1);
    } catch {
      setFormError("The server could not be reached. Check the connection and try again.");
    } finally {
      setPending(false);
    }
  }

  const saveBlocker = readOnly
    ? readOnly
    : changes.length === 0
      ? "Nothing changed yet."
      : newer
        ? "A newer version was saved: review it above first."
        : !limitsValid
          ? "Correct the marked values first."
          : !backtested
            ? "Run the backtest of these limits first."
            : null;

  return (
    <form ref={formRef} onSubmit={save} noValidate className="space-y-4" aria-describedby={`${id}-units`}>
      {(newer || refusal) && <NewerVersion base={base} set={set} message={refusal} onStartOver={() => startOver(set)} onKeep={() => { setBase(set); setRefusal(null); setLastRun(null); }} />}
      <p id={`${id}-units`} className="text-xs text-muted">
        Values in your units ({unitOf("deliveryBar", units)}, {unitOf("finalStageC", units)}); stored in bar and °C. A temperature deadband is a difference.
        Delays 0–{MAX_DELAY_S} s.
        {scopeType === "compressor" && " Lines marked “inherits” follow the model's template; override one to give this compressor its own value, or switch it off here."}
      </p>
      <div className="overflow-x-auto rounded border border-line bg-raised">
        <table className="w-full border-collapse text-sm" data-testid="limits-table">
          <caption className="sr-only">Limits of {set.label}</caption>
          <thead className="bg-panel">
            <tr>
              <th scope="col" className="px-2 py-1.5 text-left">Signal</th>
              {scopeType === "compressor" && <th scope="col" className="px-2 py-1.5 text-left">Inherited from {set.model.name}</th>}
              <th scope="col" className="px-2 py-1.5 text-left">{scopeType === "compressor" ? "This compressor" : "Setting"}</th>
              {numberFields.map((f) => (
                <th key={f} scope="col" className="px-2 py-1.5 text-right">
                  {fieldLabel[f]}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {draft.lines.map((line) => (
              <LimitLine
                key={line.key}
                line={line}
                scopeType={scopeType}
                units={units}
                disabled={!!readOnly}
                errorAt={(f) => errorAt(line, f)}
                fieldId={(f) => `${id}-${line.key}-${f}`}
                onText={(f, t) => setText(line, f, t)}
                onMode={(m) => setMode(line, m)}
              />
            ))}
            {draft.lines.length === 0 && (
              <tr>
                <td colSpan={7} className="px-2 py-3 text-muted">
                  No limits yet.
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </div>
      {!readOnly && <AddLimit onAdd={addLine} />}

      <BacktestPanel
        set={base}
        scopeType={scopeType}
        scopeId={scopeId}
        rows={limitsValid ? rows : null}
        rowsKey={rowsKey}
        lastRun={lastRun}
        onRun={setLastRun}
      />

      <section aria-labelledby={`${id}-save`} className="space-y-2 rounded border border-line bg-panel p-3">
        <h2 id={`${id}-save`} className="text-base font-semibold">
          Save
        </h2>
        <Changes changes={changes} base={base.rows} rows={rows} units={units} scopeType={scopeType} />
        <div>
          <label htmlFor={`${id}-reason`} className="block text-xs font-semibold text-muted">
            Reason for the change
          </label>
          <textarea
            id={`${id}-reason`}
            value={reason}
            rows={2}
            maxLength={500}
            disabled={!!readOnly}
            onChange={(e) => {
              setReason(e.target.value);
              touch("reason");
            }}
            aria-invalid={reasonError ? true : undefined}
            aria-describedby={reasonError ? `${id}-reason-error` : `${id}-reason-hint`}
            className="mt-0.5 w-full max-w-2xl rounded border border-line bg-white px-2 py-1 text-sm aria-[invalid=true]:border-2 aria-[invalid=true]:border-ink"
          />
          <p id={`${id}-reason-hint`} className="text-xs text-muted">
            At least {REASON_MIN} characters; kept with the change in the audit log and the event log.
          </p>
          <FieldError id={`${id}-reason-error`} message={reasonError} />
        </div>
        <FormAlert message={formError} />
        <div className="flex flex-wrap items-center gap-3">
          <button
            type="submit"
            className={buttonClass.primary}
            disabled={pending || saveBlocker !== null}
            aria-describedby={`${id}-save-why`}
            title={saveBlocker ?? undefined}
            data-testid="save-thresholds"
          >
            {pending ? "Saving…" : "Save"}
          </button>
          <span id={`${id}-save-why`} className="text-sm text-muted" data-testid="save-blocker">
            {saveBlocker}
          </span>
        </div>
        <StatusLine message={status} />
      </section>
    </form>
  );
}

function LimitLine({
  line,
  scopeType,
  units,
  disabled,
  errorAt,
  fieldId,
  onText,
  onMode,
}: {
  line: DraftLine;
  scopeType: ScopeType;
  units: UnitPreference;
  disabled: boolean;
  errorAt: (field: string) => string | undefined;
  fieldId: (field: string) => string;
  onText: (field: NumberField, text: string) => void;
  onMode: (mode: "own" | "inherit" | "off" | "remove") => void;
}) {
  const label = lineLabel(line);
  const editable = line.mode === "own" && !disabled;
  const modeError = errorAt("enabled") ?? errorAt("priority");
  const unitFor = (f: NumberField) => (f === "value" || f === "deadband" ? unitOf(line.signal, units) : "s");
  const state = line.mode === "inherit" ? "inherits" : line.mode === "off" ? "switched off" : line.inherited ? "overridden" : "own";
  return (
    <tr className={`border-t border-line align-top ${line.mode === "own" ? "" : "text-muted"}`} data-testid="limit-line" data-key={line.key} data-state={state}>
      <th scope="row" className="px-2 py-1.5 text-left font-normal">
        <span className="block">
          {signalInfo[line.signal].label} <span className="font-semibold">{line.direction}</span>
        </span>
        <PriorityMark priority={line.priority} />
      </th>
      {scopeType === "compressor" && (
        <td className="px-2 py-1.5 text-xs">{line.inherited ? <span className="num">{rowText(line.inherited, units)}</span> : <span className="text-muted">—</span>}</td>
      )}
      <td className="px-2 py-1.5">
        {scopeType === "model" ? (
          <button type="button" className={buttonClass.small} disabled={disabled} onClick={() => onMode("remove")} aria-label={`Remove ${label}`}>
            Remove
          </button>
        ) : (
          <select
            value={line.mode}
            disabled={disabled}
            onChange={(e) => onMode(e.target.value as "own" | "inherit" | "off" | "remove")}
            aria-label={`${label}: setting`}
            aria-invalid={modeError ? true : undefined}
            className="rounded border border-line bg-white px-1 py-0.5 text-sm"
          >
            {line.inherited ? (
              <>
                <option value="inherit">Inherits</option>
                <option value="own">Override</option>
                <option value="off">Switch off</option>
              </>
            ) : (
              <>
                <option value="own">Own limit</option>
                <option value="remove">Remove</option>
              </>
            )}
          </select>
        )}
        <FieldError id={`${fieldId("mode")}-error`} message={modeError} />
      </td>
      {numberFields.map((f) => {
        const error = errorAt(f);
        const inputId = fieldId(f);
        return (
          <td key={f} className="px-2 py-1.5 text-right">
            {line.mode === "off" ? (
              <span className="text-muted">—</span>
            ) : (
              <div className="flex items-center justify-end gap-1">
                <input
                  id={inputId}
                  inputMode={f === "value" ? "decimal" : "numeric"}
                  autoComplete="off"
                  spellCheck={false}
                  value={line.text[f]}
                  readOnly={!editable}
                  disabled={disabled && line.mode === "own"}
                  onChange={(e) => onText(f, e.target.value)}
                  aria-label={`${label}: ${fieldLabel[f].toLowerCase()} in ${unitFor(f)}`}
                  aria-invalid={error ? true : undefined}
                  aria-describedby={error ? `${inputId}-error` : undefined}
                  className={`num w-20 rounded border px-1.5 py-0.5 text-right ${editable ? "border-line bg-white" : "border-transparent bg-transparent"} aria-[invalid=true]:border-2 aria-[invalid=true]:border-ink`}
                />
                <span aria-hidden className="num w-8 text-left text-xs text-muted">
                  {unitFor(f)}
                </span>
              </div>
            )}
            <FieldError id={`${inputId}-error`} message={error} />
          </td>
        );
      })}
    </tr>
  );
}

function AddLimit({ onAdd }: { onAdd: (signal: AlarmSignal, direction: "high" | "low", priority: Priority) => void }) {
  const id = useId();
  const [signal, setSignal] = useState<AlarmSignal>("finalStageC");
  const [direction, setDirection] = useState<"high" | "low">("high");
  const [priority, setPriority] = useState<Priority>("warning");
  const select = "rounded border border-line bg-white px-1 py-0.5 text-sm";
  return (
    <fieldset className="flex flex-wrap items-end gap-2 text-sm">
      <legend className="mb-1 text-xs font-semibold text-muted">Add a limit</legend>
      <label className="flex flex-col text-xs text-muted" htmlFor={`${id}-signal`}>
        Signal
        <select id={`${id}-signal`} value={signal} onChange={(e) => setSignal(e.target.value as AlarmSignal)} className={select}>
          {alarmSignals.map((s) => (
            <option key={s} value={s}>
              {signalInfo[s].label}
            </option>
          ))}
        </select>
      </label>
      <label className="flex flex-col text-xs text-muted" htmlFor={`${id}-direction`}>
        Direction
        <select id={`${id}-direction`} value={direction} onChange={(e) => setDirection(e.target.value as "high" | "low")} className={select}>
          <option value="high">high</option>
          <option value="low">low</option>
        </select>
      </label>
      <label className="flex flex-col text-xs text-muted" htmlFor={`${id}-priority`}>
        Priority
        <select id={`${id}-priority`} value={priority} onChange={(e) => setPriority(e.target.value as Priority)} className={select}>
          {priorities.map((p) => (
            <option key={p} value={p}>
              {priorityWord[p]}
            </option>
          ))}
        </select>
      </label>
      <button type="button" className={buttonClass.secondary} onClick={() => onAdd(signal, direction, priority)}>
        Add limit
      </button>
    </fieldset>
  );
}

function Changes({
  changes,
  base,
  rows,
  units,
  scopeType,
}: {
  changes: RowChange[];
  base: ThresholdRow[];
  rows: ThresholdRow[];
  units: UnitPreference;
  scopeType: ScopeType;
}) {
  if (changes.length === 0) return <p className="text-sm text-muted">No changes yet.</p>;
  const before = new Map(base.map((r) => [limitKey(r), r]));
  const after = new Map(rows.map((r) => [limitKey(r), r]));
  return (
    <ul className="space-y-0.5 text-sm" data-testid="pending-changes">
      {changes.map((c) => {
        const r = (after.get(c.key) ?? before.get(c.key))!;
        const a = before.get(c.key);
        const b = after.get(c.key);
        return (
          <li key={c.key}>
            <span className="font-semibold">{lineLabel(r)}</span>:{" "}
            <span className="num">
              {a ? rowText(a, units) : scopeType === "compressor" ? "inherited" : "none"} →{" "}
              {b ? rowText(b, units) : scopeType === "compressor" ? "inherited" : "removed"}
            </span>
          </li>
        );
      })}
    </ul>
  );
}

function NewerVersion({
  base,
  set,
  message,
  onStartOver,
  onKeep,
}: {
  base: ThresholdSetDto;
  set: ThresholdSetDto;
  message: string | null;
  onStartOver: () => void;
  onKeep: () => void;
}) {
  const units = useUnits();
  const theirs = diffRows(base.rows, set.rows);
  const before = new Map(base.rows.map((r) => [limitKey(r), r]));
  const after = new Map(set.rows.map((r) => [limitKey(r), r]));
  return (
    <section role="alert" className="space-y-2 rounded border-2 border-ink bg-raised p-3 text-sm" data-testid="newer-version">
      <p className="font-semibold">
        {message ??
          `Version ${set.version} of this set was saved${set.updatedByName ? ` by ${set.updatedByName}` : ""} while you were editing version ${base.version}.`}
      </p>
      {set.version !== base.version && (
        <>
          <p>The newer values{theirs.length ? ", where they differ from the version you started from" : ""}:</p>
          <ul className="space-y-0.5" data-testid="newer-values">
            {theirs.length === 0 && <li>No limit differs (what it inherits may have changed).</li>}
            {theirs.map((c) => {
              const a = before.get(c.key);
              const b = after.get(c.key);
              return (
                <li key={c.key}>
                  <span className="font-semibold">{lineLabel((a ?? b)!)}</span>:{" "}
                  <span className="num">
                    {a ? rowText(a, units) : "none"} → {b ? rowText(b, units) : "none"}
                  </span>
                </li>
              );
            })}
          </ul>
          <div className="flex flex-wrap gap-2">
            <button type="button" className={buttonClass.primary} onClick={onStartOver}>
              Start again from version {set.version}
            </button>
            <button type="button" className={buttonClass.secondary} onClick={onKeep}>
              Keep my edits on top of version {set.version}
            </button>
          </div>
        </>
      )}
    </section>
  );
}
