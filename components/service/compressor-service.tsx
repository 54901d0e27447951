import Link from "next/link";
import { formatZoned } from "@/shared/zoned-time";
import type { ServiceDueDto, ServiceLogDto } from "@/shared/service-schema";
import { dueText, intervalText, StatusChip } from "./due-format";

/** The compressor page's service section: each task's status, and the latest entries for those who may read the log. */
export function CompressorService({ due, log, linkToService, compressorId }: { due: ServiceDueDto[]; log: ServiceLogDto[] | null; linkToService: boolean; compressorId: number }) {
  return (
    <section className="space-y-2 rounded border border-line bg-raised p-4" aria-labelledby="service-h" data-testid="compressor-service">
      <div className="flex items-baseline justify-between">
        <h2 id="service-h" className="text-lg font-semibold">
          Service
        </h2>
        {linkToService && <Link href={`/service?compressor=${compressorId}`}>Service log and recording</Link>}
      </div>
      {due.length === 0 ? (
        <p className="text-sm text-muted">No service plan for this compressor.</p>
      ) : (
        <table className="w-full text-sm">
          <thead className="text-left text-xs text-muted">
            <tr>
              <th scope="col" className="py-1">Status</th>
              <th scope="col">Task</th>
              <th scope="col">Interval</th>
              <th scope="col">Due</th>
              <th scope="col">Expected</th>
            </tr>
          </thead>
          <tbody>
            {due.map((d) => (
              <tr key={d.code} className="border-t border-line">
                <td className="py-1">
                  <StatusChip status={d.status} />
                </td>
                <td>{d.name}</td>
                <td className="num">{intervalText(d)}</td>
                <td className="num">{dueText(d)}</td>
                <td className="num">{d.forecastAt !== null ? formatZoned(d.forecastAt, d.timeZone).slice(0, 10) : "—"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {log && log.length > 0 && (
        <div>
          <h3 className="text-sm font-semibold">Latest entries</h3>
          <ul className="text-sm">
            {log.map((e) => (
              <li key={e.id}>
                <span className="num">{formatZoned(e.doneAt, e.timeZone).slice(0, 10)}</span> {e.tasks.map((t) => t.name).join(", ")}{" "}
                <span className="text-muted">by {e.performedByName}</span>
                {e.attachments.filter((a) => a.status === "stored").length > 0 && <span className="text-muted"> · {e.attachments.filter((a) => a.status === "stored").length} file(s)</span>}
              </li>
            ))}
          </ul>
        </div>
      )}
    </section>
  );
}
