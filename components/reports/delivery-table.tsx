import { FREE_AIR_BASIS, FREE_AIR_BASIS_SHORT } from "@/shared/air";
import type { DeliveryMonthRow } from "@/shared/delivery-health";

const pct = (x: number | null) => (x === null ? "no data" : `${Math.round(x * 100)} %`);
const lpm = (x: number | null) => (x === null ? "no data" : x.toFixed(0));

export const DELIVERY_NOTE = `Median over the month's measured fills (restart → stop pressure, final stretch without draw-off) of the free air delivered per minute, l/min of ${FREE_AIR_BASIS}, against rated delivery quoted on the same basis. A month without a measured fill shows "no data". Low: below the delivery advisory's share of rated (common practice).`;

/** Delivery health per compressor for the report's month; used on screen and in print. */
export function DeliveryTable({ rows, compact = false }: { rows: readonly DeliveryMonthRow[]; compact?: boolean }) {
  const th = compact ? "border-b border-line px-1 text-left font-semibold" : "px-2 py-1 text-left text-xs text-muted";
  const td = compact ? "px-1" : "px-2 py-1";
  return (
    <table className={`w-full border-collapse ${compact ? "text-[8.5pt]" : "text-sm"}`} data-testid="delivery-table">
      <thead>
        <tr>
          <th scope="col" className={th}>Compressor</th>
          <th scope="col" className={th}>Site</th>
          <th scope="col" className={th}>Fills measured</th>
          <th scope="col" className={th}>Median l/min ({FREE_AIR_BASIS_SHORT})</th>
          <th scope="col" className={th}>Rated l/min</th>
          <th scope="col" className={th}>Median of rated</th>
        </tr>
      </thead>
      <tbody className="num">
        {rows.map((r) => (
          <tr key={r.compressorId} className="border-t border-line">
            <td className={td}>{r.compressorName}</td>
            <td className={td}>{r.siteName}</td>
            <td className={td}>{r.fills}</td>
            <td className={td}>{lpm(r.medianLpm)}</td>
            <td className={td}>{lpm(r.ratedLpm)}</td>
            <td className={td}>
              {r.low ? (
                <span className="inline-flex items-center gap-1 font-semibold">
                  <span aria-hidden className="shape-advisory inline-block size-3 bg-advisory" />
                  {pct(r.medianShare)} low
                </span>
              ) : (
                pct(r.medianShare)
              )}
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
