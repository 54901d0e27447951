import { alarmBenchmarks, priorityLevel } from "@/shared/alarm-load";
import {
  formatAvailability,
  formatDuration,
  formatHours,
  formatPercent,
  mtbfBasis,
  type CauseRow,
  type ComparisonReport,
  type DailyRow,
  type MonthlyReport,
} from "@/shared/availability";
import { localDateTime, monthLabel } from "@/shared/month";
import { SAFETY_NOTICE } from "@/shared/safety";
import { Definitions, HatchDefs, HeadlineGrid, PeriodLine, stateFills, stateLabels } from "./parts";

// The printable report: plain tables and SVG drawn on the server, sized for the narrower of A4 and Letter
// (182 mm of text width at 14 mm margins), no navigation, no scripts needed to print.

const STATES = ["running", "standby", "fault", "planned", "noData"] as const;
const secondsOf = (d: DailyRow, s: (typeof STATES)[number]) =>
  s === "running" ? d.runningS : s === "standby" ? d.standbyS : s === "fault" ? d.faultS : s === "planned" ? d.plannedS : d.noDataS;

function DailyBars({ rows }: { rows: readonly DailyRow[] }) {
  const W = 680;
  const H = 170;
  const left = 34;
  const bottom = 18;
  const maxS = Math.max(1, ...rows.map((d) => d.periodS));
  const bw = rows.length ? (W - left - 30) / rows.length : 0;
  const y = (s: number) => ((H - bottom - 6) * s) / maxS;
  const ticks = [0, 0.5, 1].map((f) => f * maxS);
  return (
    <svg viewBox={`0 0 ${W} ${H}`} width="100%" role="img" aria-label="Hours per day in each state, with the day's availability">
      <HatchDefs />
      {ticks.map((t) => (
        <g key={t}>
          <line x1={left} x2={W - 30} y1={H - bottom - y(t)} y2={H - bottom - y(t)} stroke="#b9bdc3" strokeDasharray="2 3" />
          <text x={left - 4} y={H - bottom - y(t) + 3} fontSize="9" textAnchor="end" fill="#555b63">
            {(t / 3600).toFixed(0)}
          </text>
        </g>
      ))}
      <text x={4} y={10} fontSize="9" fill="#555b63">
        h
      </text>
      <text x={W - 4} y={10} fontSize="9" fill="#555b63" textAnchor="end">
        %
      </text>
      {rows.map((d, i) => {
        let acc = 0;
        const x = left + i * bw + 1;
        return (
          <g key={d.date}>
            {STATES.map((s) => {
              const v = secondsOf(d, s);
              const h = y(v);
              const yy = H - bottom - y(acc) - h;
              acc += v;
              return v > 0 ? <rect key={s} x={x} y={yy} width={Math.max(1, bw - 2)} height={h} fill={stateFills[s]} /> : null;
            })}
            <text x={x + bw / 2 - 1} y={H - 6} fontSize="8" textAnchor="middle" fill="#555b63">
              {d.date.slice(8)}
            </text>
          </g>
        );
      })}
      <polyline
        fill="none"
        stroke="#1b1e22"
        strokeWidth="1.5"
        points={rows
          .map((d, i) => (d.availability == null ? null : `${left + i * bw + bw / 2},${H - bottom - ((H - bottom - 6) * d.availability)}`))
          .filter(Boolean)
          .join(" ")}
      />
      {[0, 50, 100].map((p) => (
        <text key={p} x={W - 26} y={H - bottom - ((H - bottom - 6) * p) / 100 + 3} fontSize="9" fill="#555b63">
          {p}
        </text>
      ))}
    </svg>
  );
}

function Legend() {
  return (
    <p className="flex flex-wrap gap-3 text-[9pt]">
      {STATES.map((s) => (
        <span key={s} className="inline-flex items-center gap-1">
          <svg width="12" height="10" aria-hidden>
            <HatchDefs />
            <rect width="12" height="10" fill={stateFills[s]} stroke="#3d434a" strokeWidth={s === "noData" ? 1 : 0} />
          </svg>
          {stateLabels[s]}
        </span>
      ))}
      <span className="inline-flex items-center gap-1">
        <svg width="14" height="10" aria-hidden>
          <line x1="0" x2="14" y1="5" y2="5" stroke="#1b1e22" strokeWidth="1.5" />
        </svg>
        Availability (right axis, %)
      </span>
    </p>
  );
}

function CauseBars({ rows }: { rows: readonly CauseRow[] }) {
  if (!rows.length) return <p>No down time and no missing data in this period.</p>;
  const max = Math.max(1, ...rows.map((c) => c.seconds));
  return (
    <table className="w-full text-[9pt]">
      <thead>
        <tr className="text-[8pt] text-muted">
          <th className="text-left font-normal">Cause</th>
          <th />
          <th className="text-right font-normal">Down time</th>
          <th className="text-right font-normal">Outages</th>
        </tr>
      </thead>
      <tbody>
        {rows.map((c) => (
          <tr key={c.key}>
            <td className="w-[45%] pr-2">{c.cause}</td>
            <td>
              <svg viewBox="0 0 300 10" width="100%" height="10" aria-hidden preserveAspectRatio="none">
                <HatchDefs />
                <rect width={(300 * c.seconds) / max} height="10" fill={c.kind === "trip" ? stateFills.fault : c.kind === "planned" ? stateFills.planned : stateFills.noData} />
              </svg>
            </td>
            <td className="num w-[16%] text-right">{formatHours(c.seconds, 2)} h</td>
            <td className="num w-[10%] text-right">{c.outages}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

const th = "border-b border-ink px-1 py-0.5 text-left font-semibold";
const thr = `${th} text-right`;
const td = "border-b border-line px-1 py-0.5 align-top";
const tdr = `${td} num text-right whitespace-nowrap`;

export function PrintReport({ report, comparison }: { report: MonthlyReport; comparison: ComparisonReport | null }) {
  return (
    <article className="print-report mx-auto max-w-[186mm] space-y-4 bg-white p-4 text-[10pt] text-ink print:max-w-none print:p-0" data-testid="print-report">
      <header className="space-y-1 border-b border-ink pb-2">
        <p className="text-[9pt] text-muted">Airkeep — monthly report</p>
        <h1 className="text-[16pt] font-semibold leading-tight">
          {monthLabel(report.month)} — {report.scopeLabel}
        </h1>
        <p>
          <span className="font-semibold">Organisation:</span> {report.organisation ?? "not named (set the organisation.name setting)"}
        </p>
        <p className="font-semibold">Period and time zones</p>
        <ul className="list-disc pl-5">
          {report.periods.map((p) => (
            <PeriodLine key={p.siteId} p={p} />
          ))}
        </ul>
        <p className="text-[8pt] text-muted">
          Generated {new Date(report.generatedAt).toISOString().replace("T", " ").slice(0, 16)} UTC. Times in the tables are each site&apos;s local time.
        </p>
      </header>

      <section className="space-y-1">
        <h2 className="text-[12pt] font-semibold">Headline figures</h2>
        <HeadlineGrid report={report} compact />
        <p>
          <span className="font-semibold">Planned service:</span> {formatHours(report.total.split.plannedS)} h. {report.plannedService.note}
        </p>
      </section>

      <section className="break-inside-avoid space-y-1">
        <h2 className="text-[12pt] font-semibold">Daily availability</h2>
        <DailyBars rows={report.daily} />
        <Legend />
      </section>

      <section className="break-inside-avoid space-y-1">
        <h2 className="text-[12pt] font-semibold">Down time by cause</h2>
        <CauseBars rows={report.causes} />
      </section>

      <section className="space-y-1">
        <h2 className="text-[12pt] font-semibold">Availability</h2>
        <table className="w-full border-collapse text-[8.5pt]">
          <thead>
            <tr>
              <th className={th}>Compressor / site</th>
              <th className={thr}>Running h</th>
              <th className={thr}>Standby h</th>
              <th className={thr}>Fault h</th>
              <th className={thr}>Planned h</th>
              <th className={thr}>No data h</th>
              <th className={thr}>Avail. %</th>
              <th className={thr}>Excl. planned %</th>
              <th className={thr}>Starts</th>
              <th className={thr}>Failures</th>
              <th className={thr}>{mtbfBasis.running.column}</th>
              <th className={thr}>{mtbfBasis.up.column}</th>
              <th className={thr}>MTTR</th>
            </tr>
          </thead>
          <tbody>
            {report.rows.map((r) => (
              <tr key={r.key} className={r.level === "compressor" ? "" : "font-semibold"}>
                <td className={td}>
                  {r.name}
                  {r.level === "compressor" && report.scopeKind === "fleet" ? <span className="text-muted"> · {r.siteName}</span> : null}
                </td>
                <td className={tdr}>{formatHours(r.split.runningS)}</td>
                <td className={tdr}>{formatHours(r.split.standbyS)}</td>
                <td className={tdr}>{formatHours(r.split.faultS)}</td>
                <td className={tdr}>{formatHours(r.split.plannedS)}</td>
                <td className={tdr}>{formatHours(r.split.noDataS)}</td>
                <td className={tdr}>{formatAvailability(r.figures.availability)}</td>
                <td className={tdr}>{formatAvailability(r.figures.availabilityExPlanned)}</td>
                <td className={tdr}>{r.starts ?? "—"}</td>
                <td className={tdr}>{r.failures}</td>
                <td className={tdr}>{formatHours(r.mtbfS)}</td>
                <td className={tdr}>{formatHours(r.mtbfUpS)}</td>
                <td className={tdr}>{formatDuration(r.mttrS)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>

      <section className="space-y-1">
        <h2 className="text-[12pt] font-semibold">Outages</h2>
        {report.outages.length ? (
          <table className="w-full border-collapse text-[8.5pt]">
            <thead>
              <tr>
                <th className={th}>Start</th>
                <th className={th}>End</th>
                <th className={thr}>Duration</th>
                <th className={th}>Compressor</th>
                <th className={th}>Cause</th>
                <th className={th}>Failure</th>
              </tr>
            </thead>
            <tbody>
              {report.outages.map((o) => (
                <tr key={o.id}>
                  <td className={`${td} num whitespace-nowrap`}>{localDateTime(o.start, o.timeZone)}</td>
                  <td className={`${td} num whitespace-nowrap`}>{o.end == null ? "continuing" : localDateTime(o.end, o.timeZone)}</td>
                  <td className={tdr}>{formatDuration(o.durationS)}</td>
                  <td className={td}>{o.compressorName}</td>
                  <td className={td}>{o.cause}</td>
                  <td className={td}>{o.kind === "trip" ? (o.failure ? "yes" : "no (operator)") : "—"}</td>
                </tr>
              ))}
            </tbody>
          </table>
        ) : (
          <p>No trips, communication losses or planned service in this period.</p>
        )}
      </section>

      <section className="space-y-2">
        <h2 className="text-[12pt] font-semibold">Alarm load</h2>
        {report.alarmLoad.map((s) => (
          <div key={s.siteId} className="space-y-1">
            <h3 className="font-semibold">
              {s.siteName}: {s.figures.alarms} alarms, {s.figures.positions} operator position{s.figures.positions === 1 ? "" : "s"}
            </h3>
            <table className="w-full border-collapse text-[8.5pt]">
              <thead>
                <tr>
                  <th className={th}>Metric</th>
                  <th className={th}>This site</th>
                  <th className={th}>Against target</th>
                  <th className={th}>Target and source</th>
                </tr>
              </thead>
              <tbody>
                {s.results.map((r) => {
                  const b = alarmBenchmarks.find((x) => x.id === r.id)!;
                  return (
                    <tr key={r.id} className="break-inside-avoid">
                      <td className={td}>{b.metric}</td>
                      <td className={`${td} num`}>{r.value}</td>
                      <td className={td}>
                        {r.verdict === "above" ? (
                          <span className="inline-flex items-center gap-1 font-semibold">
                            <span aria-hidden className="shape-warning inline-block size-2.5 bg-warning" />
                            Above target
                          </span>
                        ) : r.verdict === "within" ? (
                          "Within target"
                        ) : (
                          "No alarms"
                        )}
                      </td>
                      <td className={td}>
                        {b.target}
                        <span className="block text-[7.5pt] text-muted">{b.source}</span>
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
            {s.figures.top.length ? (
              <table className="w-full border-collapse text-[8.5pt]">
                <thead>
                  <tr>
                    <th className={thr}>#</th>
                    <th className={th}>Most frequent alarms</th>
                    <th className={th}>Priority</th>
                    <th className={thr}>Count</th>
                    <th className={thr}>Share %</th>
                  </tr>
                </thead>
                <tbody>
                  {s.figures.top.map((t, i) => (
                    <tr key={`${t.compressorId}:${t.key}`}>
                      <td className={tdr}>{i + 1}</td>
                      <td className={td}>
                        {t.compressorName} · <span className="num">{t.key}</span>
                      </td>
                      <td className={td}>
                        {t.priority} ({priorityLevel[t.priority]})
                      </td>
                      <td className={tdr}>{t.count}</td>
                      <td className={tdr}>{formatPercent(t.share)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            ) : null}
          </div>
        ))}
      </section>

      {comparison ? (
        <section className="space-y-1">
          <h2 className="text-[12pt] font-semibold">Month to month</h2>
          <table className="w-full border-collapse text-[8.5pt]">
            <thead>
              <tr>
                <th className={th}>Month</th>
                <th className={thr}>Hours</th>
                <th className={thr}>Avail. %</th>
                <th className={thr}>Excl. planned %</th>
                <th className={thr}>Coverage %</th>
                <th className={thr}>Fault h</th>
                <th className={thr}>Failures</th>
                <th className={thr}>{mtbfBasis.running.column}</th>
                <th className={thr}>{mtbfBasis.up.column}</th>
                <th className={thr}>MTTR</th>
                <th className={thr}>Alarms</th>
              </tr>
            </thead>
            <tbody>
              {comparison.months.map((m) => (
                <tr key={m.month} className={m.month === report.month ? "font-semibold" : ""}>
                  <td className={td}>
                    {monthLabel(m.month)}
                    {m.partial ? " (to date)" : ""}
                  </td>
                  <td className={tdr}>{m.hoursMin === m.hoursMax ? m.hoursMin : `${m.hoursMin}–${m.hoursMax}`}</td>
                  <td className={tdr}>{formatAvailability(m.figures.availability)}</td>
                  <td className={tdr}>{formatAvailability(m.figures.availabilityExPlanned)}</td>
                  <td className={tdr}>{formatPercent(m.figures.coverage)}</td>
                  <td className={tdr}>{formatHours(m.split.faultS)}</td>
                  <td className={tdr}>{m.failures}</td>
                  <td className={tdr}>{formatHours(m.mtbfS)}</td>
                  <td className={tdr}>{formatHours(m.mtbfUpS)}</td>
                  <td className={tdr}>{formatDuration(m.mttrS)}</td>
                  <td className={tdr}>{m.alarms}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>
      ) : null}

      <div className="text-[8.5pt]">
        <Definitions compact />
      </div>

      <footer className="border-t border-line pt-1 text-[8pt] text-muted">
        <strong className="text-ink">Safety: </strong>
        {SAFETY_NOTICE}
      </footer>
    </article>
  );
}
