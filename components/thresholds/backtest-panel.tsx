"use client";

import { useEffect, useId, useRef, useState, type ReactNode } from "react";
import { alarmSignals, limitKey, priorities, signalInfo, type AlarmSignal, type Priority } from "@/shared/alarm-rules";
import {
  backtestSourceText,
  backtestSpanLabel,
  backtestSpans,
  type BacktestLimitStat,
  type BacktestResult,
  type BacktestSide,
  type BacktestSpan,
} from "@/shared/backtest";
import type { ScopeType, ThresholdRow, ThresholdSetDto } from "@/shared/threshold-schema";
import { buttonClass } from "../admin/form-kit";
import { siteDateTime } from "../board/format";
import { streamBacktest } from "../queries/thresholds";
import { useUnits } from "../use-units";
import { BacktestChart } from "./backtest-chart";
import { PriorityMark, priorityWord } from "./priority-mark";

/** "0 s", "12 min", "3 h 05 min", "2 d 04 h". */
export function durationText(ms: number): string {
  const s = Math.round(ms / 1000);
  if (s < 60) return `${s} s`;
  const m = Math.floor(s / 60);
  if (m < 60) return `${m} min`;
  const h = Math.floor(m / 60);
  if (h < 48) return `${h} h ${String(m % 60).padStart(2, "0")} min`;
  return `${Math.floor(h / 24)} d ${String(h % 24).padStart(2, "0")} h`;
}

function change(a: number, b: number): string {
  const d = b - a;
  return d === 0 ? "±0" : d > 0 ? `+${d}` : `−${-d}`;
}

function timeChange(a: number, b: number): string {
  const d = b - a;
  if (Math.abs(d) < 1000) return "±0";
  return `${d > 0 ? "+" : "−"}${durationText(Math.abs(d))}`;
}

export type BacktestRun = { rowsKey: string; result: BacktestResult };

type Props = {
  set: ThresholdSetDto;
  scopeType: ScopeType;
  scopeId: number;
  /** The set's own rows as they would be saved; null while they have errors. */
  rows: ThresholdRow[] | null;
  rowsKey: string;
  lastRun: BacktestRun | null;
  onRun: (run: BacktestRun) => void;
};

/** Runs the proposed rows against the set in force over stored history and shows both side by side. */
export function BacktestPanel({ set, scopeType, scopeId, rows, rowsKey, lastRun, onRun }: Props) {
  const units = useUnits();
  const id = useId();
  const [span, setSpan] = useState<BacktestSpan>("7d");
  const [compressorId, setCompressorId] = useState<number | null>(set.compressors[0]?.id ?? null);
  const [progress, setProgress] = useState<number | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [signal, setSignal] = useState<AlarmSignal | null>(null);
  const abort = useRef<AbortController | null>(null);

  useEffect(() => () => abort.current?.abort(), []);

  async function run() {
    if (!rows || compressorId == null) return;
    abort.current?.abort();
    const ctl = new AbortController();
    abort.current = ctl;
    setError(null);
    setProgress(0);
    try {
      const result = await streamBacktest({ compressorId, span, scopeType, scopeId, limits: rows }, (f) => setProgress(f), ctl.signal);
      onRun({ rowsKey, result });
    } catch (e) {
      if (!ctl.signal.aborted) setError((e as Error).message);
    } finally {
      if (abort.current === ctl) {
        abort.current = null;
        setProgress(null);
      }
    }
  }

  function cancel() {
    abort.current?.abort();
    abort.current = null;
    setProgress(null);
  }

  const result = lastRun?.result ?? null;
  const stale = lastRun !== null && lastRun.rowsKey !== rowsKey;
  const running = progress !== null;

  // The chart shows a signal whose limits the proposal changes, unless the person picked another.
  const changedSignals = result ? signalsThatDiffer(result) : [];
  const chartSignals = result ? alarmSignals.filter((s) => result.chart.series[s]) : [];
  const shownSignal = signal && chartSignals.includes(signal) ? signal : (changedSignals[0] ?? chartSignals[0] ?? null);

  return (
    <section aria-labelledby={`${id}-title`} className="space-y-3 rounded border border-line bg-raised p-3" data-testid="backtest">
      <div className="flex flex-wrap items-end gap-3">
        <h2 id={`${id}-title`} className="text-lg font-semibold">
          Backtest
        </h2>
        <fieldset className="flex items-center gap-1 text-sm">
          <legend className="sr-only">History to replay</legend>
          {backtestSpans.map((s) => (
            <label key={s} className={`num cursor-pointer rounded border px-2 py-0.5 ${s === span ? "border-ink bg-ink text-raised" : "border-line bg-raised"}`}>
              <input type="radio" className="sr-only" name={`${id}-span`} value={s} checked={s === span} onChange={() => setSpan(s)} />
              {s}
              <span className="sr-only"> ({backtestSpanLabel[s]})</span>
            </label>
          ))}
        </fieldset>
        {scopeType === "model" && (
          <label className="flex items-center gap-1 text-sm">
            <span className="text-muted">History of</span>
            <select
              value={compressorId ?? ""}
              onChange={(e) => setCompressorId(Number(e.target.value))}
              className="rounded border border-line bg-white px-1 py-0.5"
              data-testid="backtest-compressor"
            >
              {set.compressors.map((c) => (
                <option key={c.id} value={c.id}>
                  {c.name} · {c.siteName}
                </option>
              ))}
            </select>
          </label>
        )}
        <button
          type="button"
          className={buttonClass.primary}
          onClick={run}
          disabled={!rows || compressorId == null || running}
          data-testid="backtest-run"
        >
          {running ? "Running…" : result ? "Run again" : "Run backtest"}
        </button>
        {running && (
          <button type="button" className={buttonClass.secondary} onClick={cancel}>
            Cancel
          </button>
        )}
      </div>
      <p className="text-xs text-muted">
        Replays stored readings of {scopeType === "model" ? "the chosen compressor" : "this compressor"} through the same alarm evaluation the live
        engine uses, once with the limits in force and once with yours, and counts what each would have raised.
        {!rows && " Correct the marked values first."}
        {compressorId == null && " No compressor of yours uses this model, so there is no history to replay."}
      </p>
      {running && (
        <div className="space-y-1">
          <div
            role="progressbar"
            aria-label="Backtest progress"
            aria-valuemin={0}
            aria-valuemax={100}
            aria-valuenow={Math.round((progress ?? 0) * 100)}
            className="h-2 w-full overflow-hidden rounded bg-panel"
            data-testid="backtest-progress"
          >
            <div className="h-full bg-normal transition-[width]" style={{ width: `${Math.round((progress ?? 0) * 100)}%` }} />
          </div>
          <p className="num text-xs text-muted">{Math.round((progress ?? 0) * 100)} % of the history read</p>
        </div>
      )}
      {error && (
        <p role="alert" className="rounded border-2 border-ink px-2 py-1 text-sm font-semibold">
          {error}
        </p>
      )}
      {result && (
        <div className={`space-y-3 ${stale ? "opacity-60" : ""}`} aria-live="polite">
          {stale && (
            <p className="text-sm font-semibold" data-testid="backtest-stale">
              The limits changed since this run: run it again before saving.
            </p>
          )}
          <p className="text-sm">
            <span className="font-semibold">{result.compressorName}</span>, {backtestSpanLabel[result.span]} to{" "}
            <span className="num">{siteDateTime(result.to, result.timeZone)}</span> ({result.timeZone}) ·{" "}
            <span className="num">{result.samples.toLocaleString("en-GB")}</span> samples in{" "}
            <span className="num">{(result.elapsedMs / 1000).toFixed(1)} s</span>
          </p>
          <p className="rounded border border-line bg-panel px-2 py-1 text-xs" data-testid="backtest-source">
            {backtestSourceText(result.sources, result.retentionDays)}
          </p>
          <Summary result={result} />
          <ByLimit result={result} />
          {shownSignal && (
            <div className="space-y-1">
              <label className="flex items-center gap-1 text-sm">
                <span className="text-muted">Chart</span>
                <select
                  value={shownSignal}
                  onChange={(e) => setSignal(e.target.value as AlarmSignal)}
                  className="rounded border border-line bg-white px-1 py-0.5"
                  data-testid="backtest-signal"
                >
                  {chartSignals.map((s) => (
                    <option key={s} value={s}>
                      {signalInfo[s].label}
                      {changedSignals.includes(s) ? " (changed)" : ""}
                    </option>
                  ))}
                </select>
              </label>
              <BacktestChart result={result} signal={shownSignal} units={units} />
              {(result.old.markersTruncated || result.new.markersTruncated) && (
                <p className="text-xs text-muted">Only the first {result.new.markers.length} would-be alarms are marked; the counts are complete.</p>
              )}
            </div>
          )}
        </div>
      )}
    </section>
  );
}

function signalsThatDiffer(result: BacktestResult): AlarmSignal[] {
  const fingerprint = (side: BacktestSide, s: AlarmSignal) =>
    JSON.stringify(side.limits.filter((l) => l.signal === s).map((l) => [limitKey(l), l.value, l.deadband, l.onDelayS, l.offDelayS]));
  return alarmSignals.filter((s) => fingerprint(result.old, s) !== fingerprint(result.new, s));
}

function Summary({ result }: { result: BacktestResult }) {
  const { old: a, new: b } = result;
  const line = (label: ReactNode, x: string, y: string, d: string, testId: string) => (
    <tr className="border-t border-line">
      <th scope="row" className="px-2 py-1 text-left font-normal">
        {label}
      </th>
      <td className="num px-2 py-1 text-right" data-testid={`${testId}-old`}>
        {x}
      </td>
      <td className="num px-2 py-1 text-right font-semibold" data-testid={`${testId}-new`}>
        {y}
      </td>
      <td className="num px-2 py-1 text-right" data-testid={`${testId}-change`}>
        {d}
      </td>
    </tr>
  );
  return (
    <table className="w-full max-w-2xl border-collapse text-sm" data-testid="backtest-summary">
      <caption className="sr-only">Would-be alarms with the limits in force and with the proposed limits</caption>
      <thead className="bg-panel">
        <tr>
          <th scope="col" className="px-2 py-1 text-left">
            In the window
          </th>
          <th scope="col" className="px-2 py-1 text-right">
            Limits in force
          </th>
          <th scope="col" className="px-2 py-1 text-right">
            Proposed
          </th>
          <th scope="col" className="px-2 py-1 text-right">
            Change
          </th>
        </tr>
      </thead>
      <tbody>
        {priorities.map((p: Priority) =>
          line(<PriorityMark priority={p} />, String(a.raises[p]), String(b.raises[p]), change(a.raises[p], b.raises[p]), `backtest-${p}`),
        )}
        {line("All alarms raised", String(a.total), String(b.total), change(a.total, b.total), "backtest-total")}
        {line("Time in alarm", durationText(a.totalTimeInAlarmMs), durationText(b.totalTimeInAlarmMs), timeChange(a.totalTimeInAlarmMs, b.totalTimeInAlarmMs), "backtest-time")}
        {line(
          "Chattering alarms (limits)",
          `${a.chatteringRaises} (${a.chatteringLimits.length})`,
          `${b.chatteringRaises} (${b.chatteringLimits.length})`,
          change(a.chatteringRaises, b.chatteringRaises),
          "backtest-chatter",
        )}
        {line("Still active at the end", String(a.activeAtEnd.length), String(b.activeAtEnd.length), change(a.activeAtEnd.length, b.activeAtEnd.length), "backtest-active")}
        {line("Trips reported by the machine", String(result.trips), String(result.trips), "same", "backtest-trips")}
      </tbody>
    </table>
  );
}

function ByLimit({ result }: { result: BacktestResult }) {
  const stats = new Map<string, { a: BacktestLimitStat | null; b: BacktestLimitStat | null }>();
  for (const s of result.old.byLimit) stats.set(s.key, { a: s, b: null });
  for (const s of result.new.byLimit) stats.set(s.key, { a: stats.get(s.key)?.a ?? null, b: s });
  const rows = [...stats.entries()].filter(([, x]) => (x.a?.raises ?? 0) + (x.b?.raises ?? 0) > 0 || !x.a || !x.b || x.a.raises !== x.b.raises);
  if (rows.length === 0) return <p className="text-sm text-muted">Neither set would have raised a limit alarm in this window.</p>;
  return (
    <details className="text-sm" open={rows.length <= 8}>
      <summary className="cursor-pointer font-semibold">Per limit</summary>
      <table className="mt-1 w-full max-w-3xl border-collapse">
        <thead className="bg-panel">
          <tr>
            <th scope="col" className="px-2 py-1 text-left">
              Limit
            </th>
            <th scope="col" className="px-2 py-1 text-right">
              Raised now
            </th>
            <th scope="col" className="px-2 py-1 text-right">
              Proposed
            </th>
            <th scope="col" className="px-2 py-1 text-right">
              Time now
            </th>
            <th scope="col" className="px-2 py-1 text-right">
              Proposed
            </th>
          </tr>
        </thead>
        <tbody>
          {rows.map(([key, { a, b }]) => {
            const s = (a ?? b)!;
            return (
              <tr key={key} className="border-t border-line">
                <th scope="row" className="px-2 py-1 text-left font-normal">
                  <span className="mr-1">
                    {signalInfo[s.signal].label} {s.direction}
                  </span>
                  <PriorityMark priority={s.priority} word={false} />
                  <span className="sr-only"> {priorityWord[s.priority]}</span>
                </th>
                <td className="num px-2 py-1 text-right">{a ? a.raises : "—"}</td>
                <td className="num px-2 py-1 text-right font-semibold">{b ? b.raises : "—"}</td>
                <td className="num px-2 py-1 text-right">{a ? durationText(a.timeInAlarmMs) : "—"}</td>
                <td className="num px-2 py-1 text-right">{b ? durationText(b.timeInAlarmMs) : "—"}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </details>
  );
}
