"use client";

import { useRouter } from "next/navigation";
import { Bar, BarChart, CartesianGrid, Cell, ComposedChart, Legend, Line, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import type { AlarmLoadFigures } from "@/shared/alarm-load";
import type { Priority } from "@/shared/alarm-rules";
import { eventsHref, formatHours, type CauseRow, type ComparisonRow, type DailyRow } from "@/shared/availability";
import { priorityWord } from "@/shared/notify-text";
import { HatchDefs, stateFills, stateLabels, type ScopeFilter } from "./parts";

const tick = { fontSize: 12, fill: "#555b63", fontFamily: "Roboto Mono, monospace" };
const states = ["running", "standby", "fault", "planned", "noData"] as const;

type DailyPoint = { date: string; from: number; to: number; availability: number | null } & Record<(typeof states)[number], number>;

function toPoints(rows: readonly DailyRow[]): DailyPoint[] {
  return rows.map((d) => ({
    date: d.date,
    from: d.from,
    to: d.to,
    running: d.runningS / 3600,
    standby: d.standbyS / 3600,
    fault: d.faultS / 3600,
    planned: d.plannedS / 3600,
    noData: d.noDataS / 3600,
    availability: d.availability == null ? null : d.availability * 100,
  }));
}

/**
 * Hours per day in each state, stacked (compressor-hours when the scope has several compressors), with the day's
 * availability as a line on the right axis. Clicking a day opens that day's events.
 */
export function DailyChart({ rows, scope, height = 288 }: { rows: readonly DailyRow[]; scope: ScopeFilter; height?: number }) {
  const router = useRouter();
  const data = toPoints(rows);
  if (!data.length) return <p className="text-muted">No days in this period yet.</p>;
  return (
    <div style={{ height }} data-testid="daily-chart">
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart
          data={data}
          margin={{ top: 8, right: 8, bottom: 4, left: 4 }}
          onClick={(e) => {
            const i = typeof e?.activeTooltipIndex === "number" ? e.activeTooltipIndex : Number(e?.activeTooltipIndex);
            const p = Number.isInteger(i) ? data[i] : undefined;
            if (p) router.push(eventsHref({ ...scope, from: p.from, to: p.to }));
          }}
        >
          <HatchDefs />
          <CartesianGrid stroke="#b9bdc3" strokeDasharray="2 4" vertical={false} />
          <XAxis dataKey="date" tickFormatter={(d: string) => d.slice(8)} tick={tick} interval={0} minTickGap={2} />
          <YAxis yAxisId="h" tick={tick} width={48} label={{ value: "h", angle: -90, position: "insideLeft", fill: "#555b63", fontSize: 12 }} />
          <YAxis yAxisId="pct" orientation="right" domain={[0, 100]} tick={tick} width={40} tickFormatter={(v: number) => `${v}`} label={{ value: "%", angle: 90, position: "insideRight", fill: "#555b63", fontSize: 12 }} />
          <Tooltip
            contentStyle={{ fontFamily: "Roboto Mono, monospace", fontSize: 12 }}
            formatter={(value, name) => {
              const v = Number(value);
              return name === "Availability" ? [`${v.toFixed(1)} %`, name] : [`${v.toFixed(1)} h`, String(name)];
            }}
          />
          <Legend wrapperStyle={{ fontSize: 12 }} formatter={(value) => <span style={{ color: "#1b1e22" }}>{value}</span>} />
          {states.map((s) => (
            <Bar key={s} yAxisId="h" dataKey={s} name={stateLabels[s]} stackId="day" fill={stateFills[s]} isAnimationActive={false} cursor="pointer" />
          ))}
          <Line yAxisId="pct" dataKey="availability" name="Availability" stroke="#1b1e22" strokeWidth={2} dot={{ r: 2 }} isAnimationActive={false} connectNulls={false} />
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}

const causeFill = (c: CauseRow) => (c.kind === "trip" ? stateFills.fault : c.kind === "planned" ? stateFills.planned : stateFills.noData);

/** Down time (and time without data) by cause, in hours; a trip cause opens its trip events. */
export function CauseChart({ rows, scope, span }: { rows: readonly CauseRow[]; scope: ScopeFilter; span: { from: number; to: number } }) {
  const router = useRouter();
  const data = rows.map((c) => ({ ...c, hours: c.seconds / 3600, fill: causeFill(c) }));
  if (!data.length) return <p className="text-muted">No down time and no missing data in this period.</p>;
  const kindOf = (c: CauseRow) => (c.kind === "trip" ? "trip" : c.kind === "planned" ? "service" : "comms");
  return (
    <div style={{ height: Math.max(120, 40 + data.length * 34) }} data-testid="cause-chart">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} layout="vertical" margin={{ top: 4, right: 40, bottom: 4, left: 4 }}>
          <HatchDefs />
          <CartesianGrid stroke="#b9bdc3" strokeDasharray="2 4" horizontal={false} />
          <XAxis type="number" tick={tick} label={{ value: "h", position: "insideBottomRight", fill: "#555b63", fontSize: 12 }} />
          <YAxis type="category" dataKey="cause" width={220} tick={{ ...tick, fontFamily: "inherit" }} />
          <Tooltip
            contentStyle={{ fontFamily: "Roboto Mono, monospace", fontSize: 12 }}
            formatter={(value, _name, item) => {
              const c = item.payload as CauseRow;
              return [`${formatHours(c.seconds)} h (${c.outages} outage${c.outages === 1 ? "" : "s"})`, "Down time"];
            }}
          />
          <Bar
            dataKey="hours"
            name="Hours"
            isAnimationActive={false}
            cursor="pointer"
            onClick={(d: unknown) => {
              const c = (d as { payload?: CauseRow }).payload;
              if (c) router.push(eventsHref({ ...scope, kind: kindOf(c), ...span }));
            }}
            label={{ position: "right", fontSize: 12, fill: "#1b1e22", formatter: (v: unknown) => `${Number(v).toFixed(1)}` }}
          >
            {data.map((d) => (
              <Cell key={d.key} fill={d.fill} stroke="#3d434a" strokeWidth={d.kind === "nodata" ? 1 : 0} />
            ))}
          </Bar>
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}

type MonthPoint = { month: string; availability: number | null; alarmsPerHour: number | null };

/** The 12 months side by side: availability (a gap where a month has no data, never 0 %) and alarms per hour. */
export function ComparisonChart({ rows, height = 240 }: { rows: readonly ComparisonRow[]; height?: number }) {
  const data: MonthPoint[] = rows.map((r) => ({
    month: r.month,
    availability: r.figures.availability == null ? null : r.figures.availability * 100,
    alarmsPerHour: r.alarmsPerHour,
  }));
  if (!data.length) return null;
  return (
    <div style={{ height }} data-testid="comparison-chart" role="img" aria-label="Availability and alarms per hour by month">
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} margin={{ top: 8, right: 8, bottom: 4, left: 4 }}>
          <CartesianGrid stroke="#b9bdc3" strokeDasharray="2 4" vertical={false} />
          <XAxis dataKey="month" tick={tick} interval={0} tickFormatter={(m: string) => m.slice(2)} />
          <YAxis yAxisId="pct" domain={[0, 100]} tick={tick} width={40} label={{ value: "%", angle: -90, position: "insideLeft", fill: "#555b63", fontSize: 12 }} />
          <YAxis yAxisId="rate" orientation="right" tick={tick} width={48} label={{ value: "alarms/h", angle: 90, position: "insideRight", fill: "#555b63", fontSize: 12 }} />
          <Tooltip
            contentStyle={{ fontFamily: "Roboto Mono, monospace", fontSize: 12 }}
            formatter={(value, name) => {
              if (value == null) return ["no data", String(name)];
              const v = Number(value);
              return name === "Availability" ? [`${v.toFixed(1)} %`, name] : [`${v.toFixed(2)} per hour`, String(name)];
            }}
          />
          <Legend wrapperStyle={{ fontSize: 12 }} formatter={(value) => <span style={{ color: "#1b1e22" }}>{value}</span>} />
          <Bar yAxisId="rate" dataKey="alarmsPerHour" name="Alarms per hour" fill="#b9bdc3" stroke="#3d434a" isAnimationActive={false} />
          <Line yAxisId="pct" dataKey="availability" name="Availability" stroke="#1b1e22" strokeWidth={2} dot={{ r: 3 }} isAnimationActive={false} connectNulls={false} />
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}

const priorityFill: Record<Priority, string> = { critical: "#bd161c", warning: "#e3a008", advisory: "#6d4fc2" };

/** A site's alarms by priority, each bar labelled with its word and share, so the split reads without colour. */
export function PrioritySplitChart({ figures, height = 132 }: { figures: AlarmLoadFigures; height?: number }) {
  const order: Priority[] = ["critical", "warning", "advisory"];
  const data = order.map((p) => ({
    priority: priorityWord[p],
    key: p,
    alarms: figures.byPriority[p],
    share: figures.priorityShare ? figures.priorityShare[p] : null,
  }));
  if (figures.alarms === 0) return <p className="text-sm text-muted">No alarms in this period.</p>;
  return (
    <div style={{ height }} data-testid={`priority-chart-${figures.siteId}`} role="img" aria-label="Alarms by priority">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} layout="vertical" margin={{ top: 4, right: 72, bottom: 4, left: 4 }}>
          <CartesianGrid stroke="#b9bdc3" strokeDasharray="2 4" horizontal={false} />
          <XAxis type="number" tick={tick} allowDecimals={false} />
          <YAxis type="category" dataKey="priority" width={80} tick={{ ...tick, fontFamily: "inherit" }} />
          <Tooltip contentStyle={{ fontFamily: "Roboto Mono, monospace", fontSize: 12 }} formatter={(value) => [String(value), "Alarms"]} />
          <Bar
            dataKey="alarms"
            name="Alarms"
            isAnimationActive={false}
            label={{
              position: "right",
              fontSize: 12,
              fill: "#1b1e22",
              formatter: (v: unknown) => {
                const n = Number(v);
                return figures.alarms > 0 ? `${n} (${((n / figures.alarms) * 100).toFixed(0)} %)` : String(n);
              },
            }}
          >
            {data.map((d) => (
              <Cell key={d.key} fill={priorityFill[d.key]} stroke="#3d434a" />
            ))}
          </Bar>
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}
