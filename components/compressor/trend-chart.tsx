"use client";

import { useQuery } from "@tanstack/react-query";
import { useId, useMemo, useState } from "react";
import { Area, CartesianGrid, ComposedChart, Line, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import {
  trendSignalInfo,
  trendSourceLabel,
  trendSpans,
  type TrendResponse,
  type TrendSignal,
  type TrendSpan,
} from "@/shared/board";
import { pressureFromBar, pressureLabel, temperatureFromC, temperatureLabel, type UnitPreference } from "@/shared/units";
import { siteDateTime } from "../board/format";
import { trendQueries } from "../queries/trends";
import { useUnits } from "../use-units";

type Row = { t: number; mean: number | null; range: [number, number] | null };

function converter(signal: TrendSignal, units: UnitPreference): { f: (x: number) => number; unit: string; decimals: number } {
  if (trendSignalInfo[signal].quantity === "pressure") {
    const u = units.pressureUnit;
    return { f: (x) => pressureFromBar(x, u), unit: pressureLabel(u), decimals: u === "MPa" ? 2 : u === "psi" ? 0 : 1 };
  }
  const u = units.temperatureUnit;
  return { f: (x) => temperatureFromC(x, u), unit: temperatureLabel(u), decimals: 0 };
}

/** Chart rows in the person's unit; the min–max band only where a bucket holds more than one value. */
export function toRows(data: TrendResponse, f: (x: number) => number): Row[] {
  return data.points.map(([t, mean, min, max]) => ({
    t,
    mean: mean == null ? null : f(mean),
    range: min == null || max == null ? null : [f(min), f(max)],
  }));
}

function isolated(rows: readonly Row[], i: number): boolean {
  return rows[i]?.mean != null && rows[i - 1]?.mean == null && rows[i + 1]?.mean == null;
}

/** Enough decimals that neighbouring axis ticks differ when the values barely move. */
function axisDecimals(rows: readonly Row[], base: number): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (const r of rows) {
    for (const v of [r.mean, r.range?.[0], r.range?.[1]]) {
      if (v == null) continue;
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
  }
  const span = hi - lo;
  if (!Number.isFinite(span) || span <= 0) return base;
  return Math.min(3, Math.max(base, Math.ceil(-Math.log10(span / 5))));
}

function tickFormat(span: TrendSpan, timeZone: string) {
  return (t: number) => {
    const s = siteDateTime(t, timeZone); // "YYYY-MM-DD HH:mm:ss"
    if (span === "15m" || span === "1h" || span === "6h") return s.slice(11, 16);
    if (span === "24h") return s.slice(11, 16);
    if (span === "7d") return `${s.slice(5, 10)} ${s.slice(11, 13)}h`;
    if (span === "1y") return s.slice(0, 7);
    return s.slice(5, 10);
  };
}

function bucketText(ms: number): string {
  if (ms < 60_000) return `${Math.round(ms / 1000)} s`;
  if (ms < 3_600_000) return `${Math.round(ms / 60_000)} min`;
  if (ms < 86_400_000) return `${Math.round(ms / 3_600_000)} h`;
  return `${Math.round(ms / 86_400_000)} d`;
}

/** Trends from 15 minutes to a year: mean as a line, min–max as a band; which table they came from is stated. */
export function TrendChart({
  compressorId,
  stages,
  timeZone,
  initialSignal = "deliveryBar",
  initialSpan = "6h",
}: {
  compressorId: number;
  stages: number;
  timeZone: string;
  initialSignal?: TrendSignal;
  initialSpan?: TrendSpan;
}) {
  const units = useUnits();
  const [signal, setSignal] = useState<TrendSignal>(initialSignal);
  const [span, setSpan] = useState<TrendSpan>(initialSpan);
  const q = useQuery(trendQueries.trend(compressorId, signal, span));
  const selectId = useId();
  const signals = useMemo(
    () =>
      (Object.keys(trendSignalInfo) as TrendSignal[]).filter((s) => {
        const m = /^stage(\d)C$/.exec(s);
        return !m || Number(m[1]) <= stages;
      }),
    [stages],
  );
  const data = q.data;
  // While another signal or span loads, the previous chart stays (dimmed), labelled by what it actually shows.
  const shownSignal = data?.signal ?? signal;
  const shown = useMemo(() => converter(shownSignal, units), [shownSignal, units]);
  const rows = useMemo(() => (data ? toRows(data, shown.f) : []), [data, shown]);
  const hasValues = rows.some((r) => r.mean != null);
  const tickDecimals = useMemo(() => axisDecimals(rows, shown.decimals), [rows, shown.decimals]);
  const fmt = tickFormat(data?.span ?? span, timeZone);
  const title = trendSignalInfo[data?.signal ?? signal].label;

  return (
    <section aria-labelledby={`${selectId}-title`} className="space-y-2 rounded border border-line bg-raised p-3" data-testid="trend">
      <div className="flex flex-wrap items-end gap-3">
        <h2 id={`${selectId}-title`} className="text-lg font-semibold">
          Trend
        </h2>
        <label className="flex items-center gap-1 text-sm">
          <span className="text-muted">Signal</span>
          <select
            value={signal}
            onChange={(e) => setSignal(e.target.value as TrendSignal)}
            className="rounded border border-line bg-white px-1 py-0.5"
            data-testid="trend-signal"
          >
            {signals.map((s) => (
              <option key={s} value={s}>
                {trendSignalInfo[s].label}
              </option>
            ))}
          </select>
        </label>
        <div role="group" aria-label="Time span" className="flex flex-wrap gap-1">
          {trendSpans.map((s) => (
            <button
              key={s}
              type="button"
              aria-pressed={s === span}
              onClick={() => setSpan(s)}
              className={`num rounded border px-2 py-0.5 text-sm ${s === span ? "border-ink bg-ink text-raised" : "border-line bg-raised text-ink hover:bg-panel"}`}
            >
              {s}
            </button>
          ))}
        </div>
      </div>
      <p className="text-xs text-muted" data-testid="trend-source" aria-live="polite">
        {data
          ? `${title}, ${shown.unit}: mean per ${bucketText(data.bucketMs)} as a line${
              data.source === "raw" ? "" : ", min–max as a band"
            }; from ${trendSourceLabel[data.source]}. Times in the site's time zone (${timeZone}).`
          : q.error
            ? q.error.message
            : "Loading…"}
      </p>
      <div className={`h-72 ${q.isPlaceholderData ? "opacity-50" : ""}`} aria-busy={q.isFetching || undefined}>
        {data && !hasValues ? (
          <p className="flex h-full items-center justify-center text-muted">No readings in this span.</p>
        ) : (
          <ResponsiveContainer width="100%" height="100%">
            <ComposedChart data={rows} margin={{ top: 8, right: 12, bottom: 4, left: 4 }}>
              <CartesianGrid stroke="#b9bdc3" strokeDasharray="2 4" />
              <XAxis
                dataKey="t"
                type="number"
                scale="time"
                domain={data ? [data.from, data.to] : ["dataMin", "dataMax"]}
                tickFormatter={fmt}
                tick={{ fontSize: 12, fill: "#555b63", fontFamily: "Roboto Mono, monospace" }}
                minTickGap={24}
              />
              <YAxis
                width={56}
                domain={["auto", "auto"]}
                tick={{ fontSize: 12, fill: "#555b63", fontFamily: "Roboto Mono, monospace" }}
                tickFormatter={(v: number) => v.toFixed(tickDecimals)}
                label={{ value: shown.unit, angle: -90, position: "insideLeft", fill: "#555b63", fontSize: 12 }}
              />
              <Tooltip
                labelFormatter={(t) => `${siteDateTime(Number(t), timeZone)} site time`}
                formatter={(value, name) => {
                  if (Array.isArray(value)) {
                    return [`${Number(value[0]).toFixed(shown.decimals)} – ${Number(value[1]).toFixed(shown.decimals)} ${shown.unit}`, "min – max"];
                  }
                  return [`${Number(value).toFixed(shown.decimals)} ${shown.unit}`, name === "mean" ? "mean" : String(name)];
                }}
                contentStyle={{ fontFamily: "Roboto Mono, monospace", fontSize: 12 }}
              />
              {data?.source !== "raw" && (
                <Area
                  dataKey="range"
                  name="min – max"
                  stroke="none"
                  fill="#7b828b"
                  fillOpacity={0.3}
                  isAnimationActive={false}
                  connectNulls={false}
                />
              )}
              <Line
                dataKey="mean"
                name="mean"
                stroke="#1b1e22"
                strokeWidth={1.5}
                dot={(p: { index: number; cx?: number; cy?: number }) =>
                  // A value with no neighbour draws no line segment: mark it with a dot so it is not lost.
                  isolated(rows, p.index) && p.cx != null && p.cy != null ? (
                    <circle key={p.index} cx={p.cx} cy={p.cy} r={2.5} fill="#1b1e22" />
                  ) : (
                    <g key={p.index} />
                  )
                }
                isAnimationActive={false}
                connectNulls={false}
              />
            </ComposedChart>
          </ResponsiveContainer>
        )}
      </div>
    </section>
  );
}
