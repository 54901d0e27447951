import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listSites } from "@/db/sites";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

export const GET = route(async () => {
  const user = await requirePermission("board.view");
  return NextResponse.json({ sites: listSites(getDb(), user.siteIds) }, { headers: { "cache-control": "no-store" } });
});
