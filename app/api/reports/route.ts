import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { buildMonthlyReport } from "@/db/reports";
import { errorJson, route } from "@/lib/api/route";
import { noStore, readReportRequest } from "./request";

export const dynamic = "force-dynamic";

/** The monthly report (availability, downtime, outages, alarm load) for ?month=yyyy-mm&scope=fleet|site-<id>|compressor-<id>. */
export const GET = route(async (request: Request) => {
  const { user, month, scope } = await readReportRequest(request);
  const report = buildMonthlyReport(getDb(), { month, scope, siteIds: user.siteIds });
  if (!report) return errorJson(404, "No such site or compressor.");
  return NextResponse.json(report, { headers: noStore });
});
