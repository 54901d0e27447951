import { keepPreviousData, queryOptions } from "@tanstack/react-query";
import type { EventsResponse } from "@/shared/event-schema";
import { eventFilterQuery, type EventCursorParam, type EventFilterParams } from "@/shared/event-schema";
import { HttpError } from "./live";

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" }, cache: "no-store", credentials: "same-origin" });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: string } | null;
    throw new HttpError(res.status, body?.error ?? `${url} answered ${res.status}`);
  }
  return (await res.json()) as T;
}

export const eventsKey = ["events"] as const;
export const EVENTS_PAGE_SIZE = 50;

export const eventQueries = {
  /** One page of the event log for these filters, from a keyset position (null: the newest). */
  page: (filters: EventFilterParams, after: EventCursorParam | null) =>
    queryOptions({
      queryKey: [...eventsKey, "page", eventFilterQuery(filters), after ? `${after.ts}.${after.id}` : "newest"],
      queryFn: () => getJson<EventsResponse>(`/api/events?${eventFilterQuery(filters, { after, limit: EVENTS_PAGE_SIZE })}`),
      placeholderData: keepPreviousData,
      staleTime: 15_000,
    }),
};

/** The CSV export of the same filters (every page, streamed by the server). */
export function eventsCsvUrl(filters: EventFilterParams): string {
  const q = eventFilterQuery(filters);
  return `/api/events/export.csv${q ? `?${q}` : ""}`;
}
