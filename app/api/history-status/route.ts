import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { backfillStatus } from "@/db/history-backfill";
import { processAlive } from "@/lib/process-alive";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

export const GET = route(async () => {
  await requirePermission("board.view");
  return NextResponse.json({ backfill: backfillStatus(getDb(), processAlive) }, { headers: { "cache-control": "no-store" } });
});
