"use client";

import { useMemo } from "react";
import { Area, CartesianGrid, ComposedChart, Line, ReferenceLine, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from "recharts";
import { limitKey, signalInfo, type AlarmSignal, type Limit, type Priority } from "@/shared/alarm-rules";
import type { BacktestMarker, BacktestResult } from "@/shared/backtest";
import { formatInput, inputDecimals, unitOf, valueToDisplay } from "@/shared/threshold-schema";
import type { UnitPreference } from "@/shared/units";
import { siteDateTime } from "../board/format";

// The palette lives in tailwind.config.ts; SVG needs the values themselves. Greys for what is normal, the priority
// colours only for would-be alarms.
const INK = "#1b1e22";
const MUTED = "#555b63";
const FAINT = "#7b828b";
const LINE = "#b9bdc3";
const priorityColour: Record<Priority, string> = { critical: "#bd161c", warning: "#e3a008", advisory: "#6d4fc2" };
const initial: Record<Priority, string> = { critical: "C", warning: "W", advisory: "A" };

/** Octagon, triangle, diamond (the priority shapes of tailwind.config.ts) as SVG points around (x, y). */
export function shapePoints(priority: Priority, x: number, y: number, r: number): string {
  const pts: [number, number][] =
    priority === "critical"
      ? [[-0.4, -1], [0.4, -1], [1, -0.4], [1, 0.4], [0.4, 1], [-0.4, 1], [-1, 0.4], [-1, -0.4]]
      : priority === "warning"
        ? [[0, -1], [1, 0.9], [-1, 0.9]]
        : [[0, -1], [1, 0], [0, 1], [-1, 0]];
  return pts.map(([a, b]) => `${(x + a * r).toFixed(1)},${(y + b * r).toFixed(1)}`).join(" ");
}

type Row = { t: number; mean: number | null; range: [number, number] | null };

/** An axis range around [lo, hi] with a little room, ending on round numbers (so the ticks are round too). */
export function niceDomain(lo: number, hi: number, decimals: number): [number, number] {
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return [0, 1];
  const span = Math.max(hi - lo, 10 ** -decimals);
  const raw = span / 5;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * mag).find((x) => x >= raw) ?? 10 * mag;
  return [Math.floor((lo - span * 0.04) / step) * step, Math.ceil((hi + span * 0.04) / step) * step];
}
type MarkerPoint = { t: number; y: number; priority: Priority; key: string };

function markerShape(filled: boolean) {
  return function MarkerShape(props: unknown) {
    const p = props as { cx?: number; cy?: number; payload?: MarkerPoint };
    if (p.cx == null || p.cy == null || !p.payload) return <g />;
    const colour = priorityColour[p.payload.priority];
    return (
      <polygon
        points={shapePoints(p.payload.priority, p.cx, p.cy, 5.5)}
        fill={filled ? colour : "#ffffff"}
        stroke={filled ? INK : colour}
        strokeWidth={filled ? 0.8 : 1.8}
      />
    );
  };
}

const FilledMarker = markerShape(true);
const HollowMarker = markerShape(false);

function tickFormat(spanMs: number, timeZone: string) {
  return (t: number) => {
    const s = siteDateTime(t, timeZone);
    return spanMs <= 86_400_000 ? s.slice(11, 16) : s.slice(5, 10);
  };
}

/** The trend of one signal over the window, both sets of limits drawn, and where each set would have raised. */
export function BacktestChart({ result, signal, units }: { result: BacktestResult; signal: AlarmSignal; units: UnitPreference }) {
  const f = (x: number) => valueToDisplay(signal, x, units);
  const unit = unitOf(signal, units);
  const decimals = inputDecimals(signal, units);

  const rows = useMemo<Row[]>(
    () =>
      (result.chart.series[signal] ?? []).map(([t, mean, min, max]) => ({
        t,
        mean: mean == null ? null : valueToDisplay(signal, mean, units),
        range: min == null || max == null ? null : [valueToDisplay(signal, min, units), valueToDisplay(signal, max, units)],
      })),
    [result, signal, units],
  );

  const [oldMarks, newMarks] = useMemo(() => {
    const pick = (list: BacktestMarker[]): MarkerPoint[] =>
      list
        .filter((m) => m.signal === signal && m.value != null)
        .map((m) => ({ t: m.ts, y: valueToDisplay(signal, m.value!, units), priority: m.priority, key: m.key }));
    return [pick(result.old.markers), pick(result.new.markers)];
  }, [result, signal, units]);

  const ofSignal = (ls: Limit[]) => ls.filter((l) => l.signal === signal);
  const oldLimits = ofSignal(result.old.limits);
  const newLimits = ofSignal(result.new.limits);
  const same = (l: Limit) => newLimits.some((n) => limitKey(n) === limitKey(l) && n.value === l.value);

  // The axis spans the readings and every limit line, so no limit is drawn off the chart.
  let lo = Infinity;
  let hi = -Infinity;
  for (const r of rows) {
    if (r.range) {
      lo = Math.min(lo, r.range[0]);
      hi = Math.max(hi, r.range[1]);
    }
  }
  for (const l of [...oldLimits, ...newLimits]) {
    lo = Math.min(lo, f(l.value));
    hi = Math.max(hi, f(l.value));
  }
  const domain = niceDomain(lo, hi, decimals);

  const spanMs = result.to - result.from;
  const fmt = tickFormat(spanMs, result.timeZone);

  return (
    <figure className="space-y-1" data-testid="backtest-chart">
      <div className="h-72">
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart data={rows} margin={{ top: 8, right: 64, bottom: 4, left: 4 }}>
            <CartesianGrid stroke={LINE} strokeDasharray="2 4" />
            <XAxis
              dataKey="t"
              type="number"
              scale="time"
              domain={[result.from, result.to]}
              tickFormatter={fmt}
              tick={{ fontSize: 12, fill: MUTED, fontFamily: "Roboto Mono, monospace" }}
              minTickGap={24}
            />
            <YAxis
              width={60}
              domain={domain}
              allowDataOverflow
              tick={{ fontSize: 12, fill: MUTED, fontFamily: "Roboto Mono, monospace" }}
              tickFormatter={(x: number) => formatInput(x, decimals)}
              label={{ value: unit, angle: -90, position: "insideLeft", fill: MUTED, fontSize: 12 }}
            />
            <Tooltip
              labelFormatter={(t) => `${siteDateTime(Number(t), result.timeZone)} site time`}
              formatter={(value, name) => {
                if (Array.isArray(value)) return [`${formatInput(Number(value[0]), decimals)} – ${formatInput(Number(value[1]), decimals)} ${unit}`, "min – max"];
                return [`${formatInput(Number(value), decimals)} ${unit}`, String(name)];
              }}
              contentStyle={{ fontFamily: "Roboto Mono, monospace", fontSize: 12 }}
            />
            <Area dataKey="range" name="min – max" stroke="none" fill={FAINT} fillOpacity={0.3} isAnimationActive={false} connectNulls={false} />
            <Line dataKey="mean" name="mean" stroke={INK} strokeWidth={1.2} dot={false} isAnimationActive={false} connectNulls={false} />
            {oldLimits
              .filter((l) => !same(l))
              .map((l) => (
                <ReferenceLine
                  key={`old-${limitKey(l)}`}
                  y={f(l.value)}
                  stroke={FAINT}
                  strokeDasharray="6 4"
                  strokeWidth={1.5}
                  label={{ value: `${initial[l.priority]} now`, position: "right", fill: MUTED, fontSize: 11 }}
                />
              ))}
            {newLimits.map((l) => (
              <ReferenceLine
                key={`new-${limitKey(l)}`}
                y={f(l.value)}
                stroke={INK}
                strokeWidth={1.5}
                label={{ value: same(l) ? `${initial[l.priority]}` : `${initial[l.priority]} new`, position: "right", fill: INK, fontSize: 11 }}
              />
            ))}
            <Scatter data={oldMarks} dataKey="y" name="in force" shape={HollowMarker} isAnimationActive={false} />
            <Scatter data={newMarks} dataKey="y" name="proposed" shape={FilledMarker} isAnimationActive={false} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="flex flex-wrap gap-x-4 gap-y-1 text-xs text-muted">
        <span>
          <svg aria-hidden width="28" height="8" className="mr-1 inline-block">
            <line x1="0" y1="4" x2="28" y2="4" stroke={INK} strokeWidth="1.5" />
          </svg>
          proposed limit (C, W, A)
        </span>
        <span>
          <svg aria-hidden width="28" height="8" className="mr-1 inline-block">
            <line x1="0" y1="4" x2="28" y2="4" stroke={FAINT} strokeWidth="1.5" strokeDasharray="6 4" />
          </svg>
          limit in force, where it differs
        </span>
        <span>filled shape: raised by the proposed set · outlined: raised by the set in force</span>
        <span>
          {signalInfo[signal].label}, {unit}: mean per {Math.round(result.chart.bucketMs / 60_000)} min, min–max band; site time ({result.timeZone})
        </span>
      </figcaption>
    </figure>
  );
}
