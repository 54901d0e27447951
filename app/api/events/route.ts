import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { searchEvents } from "@/db/event-search";
import { parseEventSearchParams, encodeCursor, type EventsResponse } from "@/shared/event-schema";
import { errorJson, route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import { resolveEventQuery } from "./filter";

export const dynamic = "force-dynamic";

/** One page of the event log, newest first; filters and cursor as URL parameters (see shared/event-schema.ts). */
export const GET = route(async (request: Request) => {
  const user = await requirePermission("events.view");
  const p = parseEventSearchParams(new URL(request.url).searchParams);
  const db = getDb();
  const q = resolveEventQuery(db, user, p);
  if (q.error) return errorJson(400, q.error);
  const page = searchEvents(db, q.scope, q.filter, { after: p.after, limit: p.limit ?? 50 });
  const body: EventsResponse = { events: page.events, next: page.next ? encodeCursor(page.next) : null, partial: page.partial, zone: q.zone };
  return NextResponse.json(body, { headers: { "cache-control": "no-store" } });
});
