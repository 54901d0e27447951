import { dehydrate, HydrationBoundary } from "@tanstack/react-query";
import type { EventsResponse } from "@/shared/event-schema";
import { resolveEventQuery } from "@/app/api/events/filter";
import { EventLog } from "@/components/events/event-log";
import { encodeCursor, filterParamsOf, lenientEventSearchParams } from "@/shared/event-schema";
import { eventQueries, EVENTS_PAGE_SIZE } from "@/components/queries/events";
import { makeQueryClient } from "@/components/query-client";
import { getDb } from "@/db/client";
import { listCompressors } from "@/db/compressors";
import { searchEvents } from "@/db/event-search";
import { pageUser } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";
export const metadata = { title: "Events" };

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

/** /events — filters in the address: q, site, compressor, priority, kind, from, to (wall time in `tz` or the site's zone). */
export default async function EventsPage({ searchParams }: Props) {
  const user = await pageUser("events.view");
  const params = lenientEventSearchParams(await searchParams);
  const filters = filterParamsOf(params);
  const db = getDb();
  const q = resolveEventQuery(db, user, filters);
  const client = makeQueryClient();
  if (!q.error) {
    await client.prefetchQuery({
      ...eventQueries.page(filters, null),
      queryFn: (): EventsResponse => {
        const page = searchEvents(db, q.scope, q.filter, { limit: EVENTS_PAGE_SIZE });
        return { events: page.events, next: page.next ? encodeCursor(page.next) : null, partial: page.partial, zone: q.zone };
      },
    });
  }
  const sites = q.sites.map((s) => ({ id: s.id, name: s.name, timeZone: s.timeZone }));
  const compressors = listCompressors(db, user.siteIds).map((c) => ({ id: c.id, name: c.name, siteId: c.siteId }));
  return (
    <HydrationBoundary state={dehydrate(client)}>
      <div className="mx-auto max-w-7xl">
        <EventLog sites={sites} compressors={compressors} initial={filters} showsSiteless={q.scope.includeSiteless} />
      </div>
    </HydrationBoundary>
  );
}
