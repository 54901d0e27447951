import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { thresholdOverview } from "@/db/threshold-edit";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

/** GET — every model's template and the caller's compressors under it, with how many limits and overrides each has. */
export const GET = route(async () => {
  const user = await requirePermission("thresholds.view");
  return NextResponse.json(thresholdOverview(getDb(), user), { headers: { "cache-control": "no-store" } });
});
