import type { AirTestDto } from "@/shared/air-quality-schema";
import { airStandardLabels, analyteLabels } from "@/shared/air-standards";
import { formatZoned } from "@/shared/zoned-time";
import { PriorityMark } from "@/components/alarms/priority-mark";

const resultWord = { pass: "Pass", fail: "Fail", "no-limit": "No limit", missing: "Not measured" } as const;

export function PassFail({ passed }: { passed: boolean }) {
  return passed ? (
    <span className="font-semibold" data-result="pass">
      Pass
    </span>
  ) : (
    <span className="inline-flex items-center gap-1" data-result="fail">
      <PriorityMark priority="critical" chip /> <strong>Fail</strong>
    </span>
  );
}

function shown(v: number | boolean | null): string {
  if (v === null) return "—";
  if (typeof v === "boolean") return v ? "none noticed" : "noticed";
  return String(v);
}

/** One record with every analyte: value, limit, standard, pass or fail. */
export function AirTestVerdict({ t, timeZone }: { t: AirTestDto; timeZone: string }) {
  return (
    <article className="rounded border border-line bg-raised p-3 text-sm" data-testid="air-test" data-certificate={t.certificateNo}>
      <header className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <PassFail passed={t.passed} />
        <span className="font-semibold">{t.compressorName}</span>
        <span className="num">{formatZoned(t.sampledAt, timeZone)}</span>
        <span>
          {t.laboratory}, certificate {t.certificateNo}
        </span>
        <span className="text-muted">
          {t.samplePoint}, fill <span className="num">{t.fillBar} bar</span>, judged against {airStandardLabels[t.standard]}
        </span>
        {t.certificate && (
          <a href={`/api/attachments/${t.certificate.id}`} className="underline">
            Certificate ({t.certificate.name})
          </a>
        )}
      </header>
      <table className="mt-2 w-full text-left">
        <thead className="text-xs text-muted">
          <tr>
            <th className="font-normal">Analyte</th>
            <th className="font-normal">Measured</th>
            <th className="font-normal">Limit</th>
            <th className="font-normal">Result</th>
            <th className="font-normal">Source</th>
          </tr>
        </thead>
        <tbody>
          {t.verdict.analytes.map((a) => (
            <tr key={a.analyte} data-analyte={a.analyte} data-result={a.result} className="border-t border-line">
              <td>{analyteLabels[a.analyte]}</td>
              <td className="num">
                {shown(a.value)} {a.value !== null && typeof a.value === "number" ? a.unit : ""}
                {a.converted && <span className="text-muted"> (= {a.converted.value.toFixed(1)} {a.converted.unit})</span>}
              </td>
              <td className="num">{a.limitText}</td>
              <td className={a.result === "fail" || a.result === "missing" ? "font-bold" : ""}>
                {a.result === "fail" || a.result === "missing" ? "✕ " : ""}
                {resultWord[a.result]}
              </td>
              <td className="text-xs text-muted">{a.source ?? ""}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {t.note && <p className="mt-1 text-muted">{t.note}</p>}
    </article>
  );
}
