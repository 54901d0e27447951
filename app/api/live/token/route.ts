import { NextResponse } from "next/server";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import { createLiveToken } from "@/lib/live-token";
import { liveHubUrl } from "@/lib/web/live-hub-url";
import { liveTokenOriginRefusal, noStore } from "../hub-address";

export const dynamic = "force-dynamic";

/** A short-lived token for the live WebSocket, scoped to the signed-in person's sites. */
export const GET = route(async (request: Request) => {
  const refusal = liveTokenOriginRefusal(request);
  if (refusal) return refusal;
  const user = await requirePermission("board.view");
  const token = createLiveToken({ userId: user.id, sessionId: user.sessionId, siteIds: user.siteIds });
  return NextResponse.json({ url: liveHubUrl(request.headers), token }, { headers: noStore });
});
