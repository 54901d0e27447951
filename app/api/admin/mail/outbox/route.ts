import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { outboxSummary } from "@/db/mail";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

/** The outgoing queue: unsent messages first, then the newest sent, and a count per status. */
export const GET = route(async () => {
  await requirePermission("admin.mail");
  return NextResponse.json(outboxSummary(getDb()), { headers: { "cache-control": "no-store" } });
});
