import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { resolveDisplayLink } from "@/db/display-links";
import { liveTokenOriginRefusal, noStore } from "@/app/api/live/hub-address";
import { liveHubUrl } from "@/lib/web/live-hub-url";
import { errorJson, route } from "@/lib/api/route";
import { createLiveToken } from "@/lib/live-token";

export const dynamic = "force-dynamic";

/** A live WebSocket token for a wall screen, only while its display link is not revoked. */
export const GET = route(async (request: Request, { params }: { params: Promise<{ token: string }> }) => {
  const refusal = liveTokenOriginRefusal(request);
  if (refusal) return refusal;
  const access = resolveDisplayLink(getDb(), (await params).token);
  if (access.status === "revoked") return errorJson(410, "This display link has been revoked.");
  if (access.status !== "ok") return errorJson(404, "This display link is not valid.");
  const token = createLiveToken({ displayLinkId: access.id, siteIds: access.siteIds });
  return NextResponse.json({ url: liveHubUrl(request.headers), token }, { headers: noStore });
});
