"use client";

import { useQuery } from "@tanstack/react-query";
import { Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { trendSignalSchema } from "@/shared/board";
import type { AlarmDto } from "@/shared/alarm-schema";
import { pressureFromBar, pressureLabel, temperatureFromC, temperatureLabel } from "@/shared/units";
import { formatZoned } from "@/shared/zoned-time";
import { trendQueries } from "../queries/trends";
import { useUnits } from "../use-units";

const tick = { fontSize: 11, fill: "#555b63", fontFamily: "Roboto Mono, monospace" };

/** The alarm's signal from 30 minutes before it was raised to 30 minutes after (or now), with its limit marked. */
export function AlarmMiniTrend({ alarm }: { alarm: AlarmDto }) {
  const units = useUnits();
  const signal = alarm.signal === "finalStageC" ? "finalStageC" : trendSignalSchema.safeParse(alarm.signal).data;
  const trend = useQuery({ ...trendQueries.around(alarm.compressorId, signal ?? "deliveryBar", alarm.raisedAt), enabled: signal !== undefined });
  if (!signal) return null;
  const pressure = signal === "deliveryBar" || signal === "oilBar";
  const convert = (v: number) => (pressure ? pressureFromBar(v, units.pressureUnit) : temperatureFromC(v, units.temperatureUnit));
  const unit = pressure ? pressureLabel(units.pressureUnit) : temperatureLabel(units.temperatureUnit);
  const data = (trend.data?.points ?? []).map(([t, mean]) => ({ t, v: mean == null ? null : convert(mean) }));
  return (
    <figure className="space-y-1" data-testid="alarm-mini-trend">
      <figcaption className="text-xs text-muted">
        The hour around the alarm, in {unit}; the dashed line is the limit, the solid one when it was raised.
      </figcaption>
      {trend.isError ? (
        <p className="text-sm text-muted">The trend could not be loaded.</p>
      ) : (
        <div className="h-28 w-full">
          <ResponsiveContainer width="100%" height="100%">
            <LineChart data={data} margin={{ top: 4, right: 8, bottom: 0, left: 0 }}>
              <XAxis
                dataKey="t"
                type="number"
                domain={["dataMin", "dataMax"]}
                tick={tick}
                tickFormatter={(t: number) => formatZoned(t, alarm.timeZone).slice(11, 16)}
              />
              <YAxis tick={tick} width={44} domain={["auto", "auto"]} />
              <Tooltip
                contentStyle={{ fontFamily: "Roboto Mono, monospace", fontSize: 12 }}
                labelFormatter={(t) => formatZoned(Number(t), alarm.timeZone).slice(11, 19)}
                formatter={(v) => [`${Number(v).toFixed(1)} ${unit}`, "Value"]}
              />
              {alarm.limitValue != null && <ReferenceLine y={convert(alarm.limitValue)} stroke="#1b1e22" strokeDasharray="4 3" />}
              <ReferenceLine x={alarm.raisedAt} stroke="#1b1e22" />
              <Line dataKey="v" stroke="#3d434a" strokeWidth={2} dot={false} isAnimationActive={false} connectNulls={false} />
            </LineChart>
          </ResponsiveContainer>
        </div>
      )}
    </figure>
  );
}
