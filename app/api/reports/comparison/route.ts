import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { buildComparison } from "@/db/reports";
import { errorJson, route } from "@/lib/api/route";
import { noStore, readReportRequest } from "../request";

export const dynamic = "force-dynamic";

/** Headline figures of the 12 months ending with ?month, for the same scope. */
export const GET = route(async (request: Request) => {
  const { user, month, scope } = await readReportRequest(request);
  const comparison = buildComparison(getDb(), { month, scope, siteIds: user.siteIds });
  if (!comparison) return errorJson(404, "No such site or compressor.");
  return NextResponse.json(comparison, { headers: noStore });
});
