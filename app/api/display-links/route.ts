import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listDisplayLinks } from "@/db/display-links";
import { noStore } from "@/app/api/live/hub-address";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

/** Every display link (never its token, which is not stored). */
export const GET = route(async () => {
  await requirePermission("admin.displays");
  return NextResponse.json({ links: listDisplayLinks(getDb()) }, { headers: noStore });
});
