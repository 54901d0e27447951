import { notFound } from "next/navigation";
import { PrintButton } from "@/components/reports/print-button";
import { PrintReport } from "@/components/reports/print-report";
import { getDb } from "@/db/client";
import { buildComparison, buildMonthlyReport } from "@/db/reports";
import { listSites } from "@/db/sites";
import { pageUser } from "@/lib/auth/current-user";
import { parseScope, reportHref, reportQuerySchema } from "@/shared/availability";
import { monthHasBegun, monthLabel, previousMonth } from "@/shared/month";

// The printable report lives outside the (app) group so no navigation chrome is rendered at all; the browser's
// print dialog makes the PDF. Page size is left to the printer (A4 or Letter): the content fits the narrower.

export const dynamic = "force-dynamic";

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };
const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);

const PRINT_CSS = `
@page { size: auto; margin: 14mm 12mm 14mm 12mm; }
@media print {
  html, body { background: #ffffff !important; }
  .print-report table { page-break-inside: auto; }
  .print-report tr, .print-report .break-inside-avoid { break-inside: avoid; page-break-inside: avoid; }
  .print-report thead { display: table-header-group; }
  .print-report h2, .print-report h3 { break-after: avoid; page-break-after: avoid; }
  .print-report a { color: inherit; text-decoration: none; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
`;

export async function generateMetadata({ searchParams }: Props) {
  const month = first((await searchParams).month);
  return { title: month && /^\d{4}-\d{2}$/.test(month) ? `Report ${monthLabel(month)}` : "Report" };
}

export default async function PrintReportPage({ searchParams }: Props) {
  const user = await pageUser("reports.view");
  const db = getDb();
  const now = Date.now();
  const sp = await searchParams;
  const zone = listSites(db, user.siteIds)[0]?.timeZone ?? "UTC";
  const parsed = reportQuerySchema.safeParse({ month: first(sp.month) ?? previousMonth(now, zone), scope: first(sp.scope) ?? undefined });
  if (!parsed.success || !monthHasBegun(parsed.data.month, now)) notFound();
  const req = { month: parsed.data.month, scope: parseScope(parsed.data.scope), siteIds: user.siteIds, now };
  const report = buildMonthlyReport(db, req);
  if (!report) notFound();
  const comparison = buildComparison(db, req);
  return (
    <div className="min-h-screen bg-canvas py-4 print:bg-white print:py-0">
      <style>{PRINT_CSS}</style>
      <div className="no-print mx-auto mb-3 flex max-w-[186mm] flex-wrap items-center gap-3 px-4">
        <PrintButton />
        <a href={reportHref(parsed.data.month, parsed.data.scope)} className="text-sm">
          Back to the report
        </a>
        <span className="text-xs text-muted">Prints on A4 or Letter, as your printer is set.</span>
      </div>
      <PrintReport report={report} comparison={comparison} />
    </div>
  );
}
