import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { thresholdHistory } from "@/db/threshold-edit";
import { errorJson, route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import { scopeFrom } from "@/lib/thresholds/access";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ scopeType: string; scopeId: string }> };

/** GET — the set's changes, newest first: who, when, why, and every row before and after (from the audit log). */
export const GET = route(async (_request: Request, { params }: Ctx) => {
  const user = await requirePermission("thresholds.view");
  const scope = await scopeFrom(params);
  const entries = scope && thresholdHistory(getDb(), scope.scopeType, scope.scopeId, user);
  if (!entries) return errorJson(404, "No such threshold set.");
  return NextResponse.json({ entries }, { headers: { "cache-control": "no-store" } });
});
