import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listSites } from "@/db/sites";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

/** Every site, whatever the administrator's own site scope. */
export const GET = route(async () => {
  await requirePermission("admin.sites");
  return NextResponse.json({ sites: listSites(getDb(), null) }, { headers: { "cache-control": "no-store" } });
});
