import { NextResponse } from "next/server";
import { z } from "zod";
import { getAlarm } from "@/db/alarms";
import { getDb } from "@/db/client";
import { errorJson, route } from "@/lib/api/route";
import { inScope, requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

const idSchema = z.coerce.number().int().positive();

/** One alarm, whatever its state. One outside the caller's sites answers like one that does not exist. */
export const GET = route(async (_request: Request, { params }: { params: Promise<{ id: string }> }) => {
  const user = await requirePermission("alarms.view");
  const id = idSchema.safeParse((await params).id);
  const alarm = id.success ? getAlarm(getDb(), id.data) : null;
  if (!alarm || !inScope(user, alarm.siteId)) return errorJson(404, "No such alarm.");
  return NextResponse.json({ alarm, at: Date.now() }, { headers: { "cache-control": "no-store" } });
});
