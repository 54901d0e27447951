import { getDb } from "@/db/client";
import { iterateEventChunks } from "@/db/event-search";
import { parseEventSearchParams, type EventDto } from "@/shared/event-schema";
import { errorJson, route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import { eventCsvHeader, eventCsvRecord } from "../csv";
import { resolveEventQuery } from "../filter";

export const dynamic = "force-dynamic";

/**
 * The event log as CSV, with the same filters as the page and the caller's scope. Streamed: each pull of the stream
 * reads the next chunk of rows by keyset (no statement stays open while the client is slow) and encodes it.
 */
export const GET = route(async (request: Request) => {
  const user = await requirePermission("events.view");
  const p = parseEventSearchParams(new URL(request.url).searchParams);
  const db = getDb();
  const q = resolveEventQuery(db, user, p);
  if (q.error) return errorJson(400, q.error);

  const chunks = iterateEventChunks(db, q.scope, q.filter, 2000);
  // The first chunk is read before answering, so a query that fails does so with an error status, not a cut-off file.
  let first: IteratorResult<EventDto[]> | null = chunks.next();
  const encoder = new TextEncoder();
  let headerSent = false;
  const stream = new ReadableStream<Uint8Array>({
    pull(controller) {
      if (!headerSent) {
        headerSent = true;
        controller.enqueue(encoder.encode(eventCsvHeader));
        return;
      }
      try {
        const next = first ?? chunks.next();
        first = null;
        if (next.done) {
          controller.close();
          return;
        }
        controller.enqueue(encoder.encode(next.value.map((e) => eventCsvRecord(e, q.zone)).join("")));
      } catch (e) {
        console.error("[events export] failed", e);
        controller.error(e);
      }
    },
    cancel() {
      chunks.return(undefined);
    },
  });

  const stamp = new Date().toISOString().slice(0, 10);
  return new Response(stream, {
    headers: {
      "content-type": "text/csv; charset=utf-8; header=present",
      "content-disposition": `attachment; filename="airkeep-events-${stamp}.csv"`,
      "cache-control": "no-store",
      "x-content-type-options": "nosniff",
    },
  });
});
