import { NextResponse } from "next/server";
import { listAlarms } from "@/db/alarms";
import { getDb } from "@/db/client";
import { parseAlarmListParams } from "@/shared/alarm-list-params";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import type { AlarmsResponse } from "@/shared/alarm-schema";
import { alarmSiteIds } from "./scope";

export const dynamic = "force-dynamic";

/**
 * Alarms not back to normal in the caller's sites, critical first then newest; filters: site, compressor, priority,
 * state. `at` is the server time of the answer (ages are computed against it).
 */
export const GET = route(async (request: Request) => {
  const user = await requirePermission("alarms.view");
  const p = parseAlarmListParams(new URL(request.url).searchParams);
  const alarms = listAlarms(getDb(), {
    siteIds: alarmSiteIds(user, p.site),
    priority: p.priority,
    compressorId: p.compressor,
    states: p.state ? [p.state] : undefined,
  });
  const body: AlarmsResponse = { alarms, at: Date.now() };
  return NextResponse.json(body, { headers: { "cache-control": "no-store" } });
});
