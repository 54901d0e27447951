import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { getThresholdSet } from "@/db/threshold-edit";
import { errorJson, route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import { scopeFrom } from "@/lib/thresholds/access";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ scopeType: string; scopeId: string }> };

/**
 * GET /api/thresholds/model/:id or /api/thresholds/compressor/:id — the set's own rows (bar, °C), what a compressor
 * inherits from its model's template, the version to send back on save, and why the caller may not save, if so.
 * A compressor outside the caller's sites answers 404, like one that does not exist.
 */
export const GET = route(async (_request: Request, { params }: Ctx) => {
  const user = await requirePermission("thresholds.view");
  const scope = await scopeFrom(params);
  const set = scope && getThresholdSet(getDb(), scope.scopeType, scope.scopeId, user);
  if (!set) return errorJson(404, "No such threshold set.");
  return NextResponse.json(set, { headers: { "cache-control": "no-store" } });
});
