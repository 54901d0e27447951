import type { AirQualityReportSite } from "@/shared/air-quality-report";

/** The monthly report's air-quality section (screen and print). */
export function AirQualityReportSection({ sites, print = false }: { sites: readonly AirQualityReportSite[] | undefined; print?: boolean }) {
  if (!sites) return null;
  const cell = print ? "border border-black px-1 text-right" : "p-1 text-right num";
  const head = print ? "border border-black px-1 text-left" : "p-1 text-left font-normal text-xs text-muted";
  return (
    <section aria-labelledby="air-quality-report" className="space-y-2 break-inside-avoid" data-testid="report-air-quality">
      <h2 id="air-quality-report" className={print ? "text-[12pt] font-semibold" : "text-lg font-semibold"}>
        Air quality
      </h2>
      <table className={print ? "w-full border-collapse text-[8.5pt]" : "w-full rounded border border-line bg-raised text-sm"}>
        <thead>
          <tr>
            <th className={head}>Site</th>
            <th className={head}>Tests due</th>
            <th className={head}>Done</th>
            <th className={head}>Passed</th>
            <th className={head}>Failed</th>
            <th className={head}>Overdue (compressor-days)</th>
            <th className={head}>Cartridge changes</th>
          </tr>
        </thead>
        <tbody>
          {sites.map((s) => (
            <tr key={s.siteId} className="border-t border-line" data-site={s.siteName}>
              <td className={print ? "border border-black px-1" : "p-1"}>{s.siteName}</td>
              <td className={cell}>{s.due}</td>
              <td className={cell}>{s.done}</td>
              <td className={cell} data-testid="aq-passed">{s.passed}</td>
              <td className={cell} data-testid="aq-failed">
                {s.failed > 0 ? <strong>{s.failed}</strong> : s.failed}
              </td>
              <td className={cell}>{s.overdueDays.toFixed(1)}</td>
              <td className={cell}>{s.cartridgeChanges}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}
