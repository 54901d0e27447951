import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { loadBoard } from "@/db/board";
import { resolveDisplayLink } from "@/db/display-links";
import { noStore } from "@/app/api/live/hub-address";
import { errorJson, route } from "@/lib/api/route";

export const dynamic = "force-dynamic";

/** The board a wall screen shows (its link's sites), while the link is not revoked. */
export const GET = route(async (_request: Request, { params }: { params: Promise<{ token: string }> }) => {
  const db = getDb();
  const access = resolveDisplayLink(db, (await params).token);
  if (access.status === "revoked") return errorJson(410, "This display link has been revoked.");
  if (access.status !== "ok") return errorJson(404, "This display link is not valid.");
  return NextResponse.json(loadBoard(db, access.siteIds), { headers: noStore });
});
