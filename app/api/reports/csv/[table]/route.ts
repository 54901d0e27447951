import { getDb } from "@/db/client";
import { buildComparison, buildMonthlyReport } from "@/db/reports";
import { errorJson, route } from "@/lib/api/route";
import { csvTableSchema } from "@/shared/availability";
import { comparisonCsv, reportCsv } from "@/lib/reports/csv";
import { readReportRequest } from "../../request";

export const dynamic = "force-dynamic";

/** One table of the monthly report as a CSV download: /api/reports/csv/<table>?month=yyyy-mm&scope=… */
export const GET = route(async (request: Request, { params }: { params: Promise<{ table: string }> }) => {
  const { user, month, scope, scopeParam } = await readReportRequest(request);
  const table = csvTableSchema.safeParse((await params).table);
  if (!table.success) return errorJson(404, "No such table.");
  const db = getDb();
  let body: string;
  if (table.data === "comparison") {
    const c = buildComparison(db, { month, scope, siteIds: user.siteIds });
    if (!c) return errorJson(404, "No such site or compressor.");
    body = comparisonCsv(c);
  } else {
    const r = buildMonthlyReport(db, { month, scope, siteIds: user.siteIds });
    if (!r) return errorJson(404, "No such site or compressor.");
    body = reportCsv(table.data, r);
  }
  const filename = `airkeep-${table.data}-${scopeParam}-${month}.csv`;
  return new Response(body, {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="${filename}"`,
      "cache-control": "no-store",
    },
  });
});
