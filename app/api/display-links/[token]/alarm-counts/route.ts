import { NextResponse } from "next/server";
import { activeAlarmCounts } from "@/db/alarms";
import { getDb } from "@/db/client";
import { resolveDisplayLink } from "@/db/display-links";
import type { AlarmCountsResponse } from "@/shared/alarm-schema";
import { noStore } from "@/app/api/live/hub-address";
import { errorJson, route } from "@/lib/api/route";

export const dynamic = "force-dynamic";

/** Active alarm counts for a wall screen's tiles, limited to its link's sites, while the link is not revoked. */
export const GET = route(async (_request: Request, { params }: { params: Promise<{ token: string }> }) => {
  const db = getDb();
  const access = resolveDisplayLink(db, (await params).token);
  if (access.status === "revoked") return errorJson(410, "This display link has been revoked.");
  if (access.status !== "ok") return errorJson(404, "This display link is not valid.");
  const body: AlarmCountsResponse = { counts: Object.fromEntries(activeAlarmCounts(db, access.siteIds)), at: Date.now() };
  return NextResponse.json(body, { headers: noStore });
});
