"use client";

import { useQuery } from "@tanstack/react-query";
import { CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { FREE_AIR_BASIS, FREE_AIR_BASIS_SHORT } from "@/shared/air";
import { pressureLabel, temperatureLabel } from "@/shared/units";
import { pressureShort, siteDateTime, temperatureShort } from "../board/format";
import { trendQueries } from "../queries/trends";
import { useUnits } from "../use-units";

const pct = (share: number) => `${Math.round(share * 100)} %`;
const tick = { fontSize: 12, fill: "#555b63", fontFamily: "Roboto Mono, monospace" };

/**
 * Delivery health: the free air the unit delivered into its bank per minute, measured on each fill, against its rating;
 * a trend over the last 90 days and the last fills. The advisory shape appears when the median of the last fills is low.
 */
export function DeliveryHealth({ compressorId, timeZone }: { compressorId: number; timeZone: string }) {
  const q = useQuery(trendQueries.deliveries(compressorId));
  const { pressureUnit, temperatureUnit } = useUnits();
  const d = q.data;
  const fills = d?.fills ?? [];
  const rated = fills.at(-1)?.ratedLpm ?? null;
  const bar = (v: number) => pressureShort(v, pressureUnit);
  return (
    <section aria-labelledby="delivery-health-title" className="space-y-2" data-testid="delivery-health">
      <h2 id="delivery-health-title" className="text-lg font-semibold">
        Delivery health
      </h2>
      <p className="text-xs text-muted">
        Free air delivered into the bank per minute, measured on each fill that ran from restart to stop pressure, over
        its final stretch with no air drawn off; from the bank&apos;s real-gas contents, with the bank taken at the intake
        temperature (no bank temperature is sent). l/min of {FREE_AIR_BASIS}, as rated delivery is quoted.
      </p>
      {q.error && <p role="alert">{q.error.message}</p>}
      {d && (
        <p className="num text-base" data-testid="delivery-median">
          {d.median === null ? (
            <span className="text-muted">
              Fewer than {d.settings.fills} measured fills: no judgement yet.
            </span>
          ) : d.low ? (
            <span className="inline-flex items-center gap-2 font-semibold">
              <span aria-hidden className="shape-advisory inline-block size-3 bg-advisory" />
              Advisory: median of the last {d.settings.fills} fills {pct(d.median)} of rated, below {pct(d.settings.minShare)}
            </span>
          ) : (
            <span>
              Median of the last {d.settings.fills} fills: {pct(d.median)} of rated (advisory below {pct(d.settings.minShare)})
            </span>
          )}
        </p>
      )}
      {fills.length > 0 && (
        <div className="h-56">
          <ResponsiveContainer width="100%" height="100%">
            <LineChart data={fills} margin={{ top: 8, right: 12, bottom: 4, left: 4 }}>
              <CartesianGrid stroke="#b9bdc3" strokeDasharray="2 4" />
              <XAxis
                dataKey="endTs"
                type="number"
                scale="time"
                domain={["dataMin", "dataMax"]}
                tickFormatter={(t: number) => siteDateTime(t, timeZone).slice(5, 10)}
                tick={tick}
                minTickGap={24}
              />
              <YAxis
                width={56}
                domain={[0, "auto"]}
                tick={tick}
                label={{ value: "l/min", angle: -90, position: "insideLeft", fill: "#555b63", fontSize: 12 }}
              />
              {rated !== null && <ReferenceLine y={rated} stroke="#555b63" strokeDasharray="6 3" label={{ value: "rated", fill: "#555b63", fontSize: 12 }} />}
              <Tooltip
                labelFormatter={(t) => `${siteDateTime(Number(t), timeZone)} site time`}
                formatter={(v) => [`${Number(v).toFixed(0)} l/min (${FREE_AIR_BASIS_SHORT})`, "delivered"]}
                contentStyle={{ fontFamily: "Roboto Mono, monospace", fontSize: 12 }}
              />
              <Line dataKey="deliveryLpm" stroke="#1b1e22" strokeWidth={1.5} dot={{ r: 2 }} isAnimationActive={false} />
            </LineChart>
          </ResponsiveContainer>
        </div>
      )}
      {d && fills.length === 0 && <p className="text-muted">No fill measured in the last 90 days.</p>}
      {fills.length > 0 && (
        <div className="max-h-72 overflow-y-auto rounded border border-line bg-raised">
          <table className="w-full border-collapse text-sm" data-testid="delivery-fills">
            <thead className="sticky top-0 bg-panel">
              <tr className="text-left text-xs text-muted">
                <th scope="col" className="px-2 py-1">Fill ended (site time)</th>
                <th scope="col" className="px-2 py-1">Measured over ({pressureLabel(pressureUnit)})</th>
                <th scope="col" className="px-2 py-1">Delivered (l/min, {FREE_AIR_BASIS_SHORT})</th>
                <th scope="col" className="px-2 py-1">Of rated</th>
                <th scope="col" className="px-2 py-1">Bank taken at</th>
              </tr>
            </thead>
            <tbody className="num">
              {[...fills]
                .reverse()
                .slice(0, 50)
                .map((f) => (
                  <tr key={f.startTs} className="border-t border-line">
                    <td className="px-2 py-1">{siteDateTime(f.endTs, timeZone)}</td>
                    <td className="px-2 py-1">
                      {bar(f.fromBar)} → {bar(f.toBar)} in {Math.round((f.endTs - f.startTs) / 60_000)} min
                    </td>
                    <td className="px-2 py-1">{f.deliveryLpm.toFixed(0)}</td>
                    <td className="px-2 py-1">{pct(f.share)}</td>
                    <td className="px-2 py-1">
                      {temperatureShort(f.bankC, temperatureUnit)} {temperatureLabel(temperatureUnit)}
                    </td>
                  </tr>
                ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}
