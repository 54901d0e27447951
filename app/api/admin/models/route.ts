import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listModels } from "@/db/compressors";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

export const GET = route(async () => {
  await requirePermission("admin.compressors");
  return NextResponse.json({ models: listModels(getDb()) }, { headers: { "cache-control": "no-store" } });
});
