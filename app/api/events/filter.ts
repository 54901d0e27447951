import type { Db } from "@/db/client";
import { eventScopeOf, type EventFilter, type EventScope } from "@/db/event-search";
import { listSites } from "@/db/sites";
import { effectiveZone, type EventSearchParams } from "@/shared/event-schema";
import { zonedLocalToUtc } from "@/shared/zoned-time";
import type { CurrentUser } from "@/lib/auth/current-user";
import type { SiteDto } from "@/shared/site-schema";

export type ResolvedEventQuery = {
  scope: EventScope;
  filter: EventFilter;
  /** The zone the time range was entered in and times are shown in. */
  zone: string;
  sites: SiteDto[];
  /** Set when a time in the range is not a valid local time. */
  error?: string;
};

/**
 * URL parameters → the caller's scope and the search filter. The scope is the person's sites; events of no site
 * (sign-ins, account and fleet configuration) only for administrators.
 */
export function resolveEventQuery(db: Db, user: CurrentUser, p: EventSearchParams): ResolvedEventQuery {
  const sites = listSites(db, user.siteIds);
  const zone = effectiveZone(p, sites);
  const from = p.from ? zonedLocalToUtc(p.from, zone) : undefined;
  const to = p.to ? zonedLocalToUtc(p.to, zone) : undefined;
  const filter: EventFilter = {
    q: p.q,
    siteId: p.site,
    compressorId: p.compressor,
    priority: p.priority,
    kind: p.kind,
    from: from ?? undefined,
    to: to ?? undefined,
  };
  const error = from === null || to === null ? `That time does not exist in ${zone}.` : undefined;
  return { scope: eventScopeOf(user), filter, zone, sites, error };
}
