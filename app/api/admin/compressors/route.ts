import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listCompressors } from "@/db/compressors";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

/** Every compressor, with whether a device credential has been issued (never the hash). */
export const GET = route(async () => {
  await requirePermission("admin.compressors");
  return NextResponse.json({ compressors: listCompressors(getDb(), null) }, { headers: { "cache-control": "no-store" } });
});
