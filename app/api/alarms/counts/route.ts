import { NextResponse } from "next/server";
import { activeAlarmCounts } from "@/db/alarms";
import { getDb } from "@/db/client";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import type { AlarmCountsResponse } from "@/shared/alarm-schema";

export const dynamic = "force-dynamic";

/** Active alarms per compressor and priority in the caller's sites (for the board's tiles). */
export const GET = route(async () => {
  const user = await requirePermission("alarms.view");
  const counts = Object.fromEntries(activeAlarmCounts(getDb(), user.siteIds));
  const body: AlarmCountsResponse = { counts, at: Date.now() };
  return NextResponse.json(body, { headers: { "cache-control": "no-store" } });
});
