import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { readBackfillStatus } from "@/db/history-status";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

export const GET = route(async () => {
  await requirePermission("board.view");
  return NextResponse.json({ backfill: readBackfillStatus(getDb()) }, { headers: { "cache-control": "no-store" } });
});
