import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listCompressors } from "@/db/compressors";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

export const GET = route(async () => {
  const user = await requirePermission("compressors.view");
  return NextResponse.json({ compressors: listCompressors(getDb(), user.siteIds) }, { headers: { "cache-control": "no-store" } });
});
