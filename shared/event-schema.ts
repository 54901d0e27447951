import { z } from "zod";
import { prioritySchema, type Priority } from "@/shared/alarm-rules";
import { isValidTimeZone } from "@/shared/site-schema";
import { eventKinds } from "./event-kinds";

// The event log's filters as URL parameters: one parser for the page, the JSON route and the CSV export, and one
// writer for the links the client builds. Times are wall-clock times ("2025-03-14T08:00") in the zone the person
// reads in (see effectiveZone); the server turns them into UTC.

const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);
const opt = <T extends z.ZodType>(s: T) => z.preprocess(blankToUndefined, s.optional());

const localTime = z.string().regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2})?$/, "Use a date and time such as 2025-03-14T08:00");

export type EventCursorParam = { ts: number; id: number };

const cursor = z
  .string()
  .regex(/^\d{1,16}\.\d{1,16}$/, "Not a page position")
  .transform((s): EventCursorParam => {
    const [ts, id] = s.split(".").map(Number) as [number, number];
    return { ts, id };
  });

export const eventSearchParamsSchema = z.object({
  // A NUL or another control character is never part of a search; SQLite's full-text query would fail on it.
  q: opt(z.string().trim().max(200).refine((s) => !/[\u0000-\u001f\u007f]/.test(s), "The search may not contain control characters")),
  site: opt(z.coerce.number().int().positive()),
  compressor: opt(z.coerce.number().int().positive()),
  priority: opt(prioritySchema),
  kind: opt(z.enum(eventKinds)),
  from: opt(localTime),
  to: opt(localTime),
  tz: opt(z.string().refine(isValidTimeZone, "Not a time zone")),
  after: opt(cursor),
  limit: opt(z.coerce.number().int().min(1).max(200)),
});
export type EventSearchParams = z.infer<typeof eventSearchParamsSchema>;
/** The filters alone (what a link or an export carries). */
export type EventFilterParams = Omit<EventSearchParams, "after" | "limit">;

type RawParams = URLSearchParams | Record<string, string | string[] | undefined>;

function toRecord(raw: RawParams): Record<string, string | undefined> {
  if (raw instanceof URLSearchParams) return Object.fromEntries(raw.entries());
  return Object.fromEntries(Object.entries(raw).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v]));
}

/** Throws a ZodError on bad input (a route answers 400). */
export function parseEventSearchParams(raw: RawParams): EventSearchParams {
  return eventSearchParamsSchema.parse(toRecord(raw));
}

/** For a page: bad parameters are dropped one by one rather than refusing the page. */
export function lenientEventSearchParams(raw: RawParams): EventSearchParams {
  const rec = toRecord(raw);
  const out: Record<string, unknown> = {};
  for (const [key, schema] of Object.entries(eventSearchParamsSchema.shape)) {
    const r = (schema as z.ZodType).safeParse(rec[key]);
    if (r.success && r.data !== undefined) out[key] = r.data;
  }
  return out as EventSearchParams;
}

export const encodeCursor = (c: EventCursorParam) => `${c.ts}.${c.id}`;

const order = ["q", "site", "compressor", "priority", "kind", "from", "to", "tz"] as const;

/** "q=oil&site=2&tz=Europe%2FOslo" — the filters in a fixed order, empty ones left out. */
export function eventFilterQuery(p: EventFilterParams, extra: { after?: EventCursorParam | null; limit?: number } = {}): string {
  const sp = new URLSearchParams();
  for (const key of order) {
    const v = p[key];
    if (v !== undefined && v !== null && String(v).trim() !== "") sp.set(key, String(v));
  }
  if (extra.after) sp.set("after", encodeCursor(extra.after));
  if (extra.limit) sp.set("limit", String(extra.limit));
  return sp.toString();
}

/** The filters without the paging parameters. */
export function filterParamsOf(p: EventSearchParams): EventFilterParams {
  const { after: _a, limit: _l, ...rest } = p;
  return rest;
}

export type ZoneSite = { id: number; name: string; timeZone: string };

/** The zones a person may read the log in: those of their sites, in the order of the sites' names. */
export function zoneChoices(sites: readonly ZoneSite[]): { timeZone: string; label: string }[] {
  const seen = new Map<string, string[]>();
  for (const s of [...sites].sort((a, b) => a.name.localeCompare(b.name))) {
    const names = seen.get(s.timeZone) ?? [];
    names.push(s.name);
    seen.set(s.timeZone, names);
  }
  return [...seen].map(([timeZone, names]) => ({ timeZone, label: `${timeZone} (${names.join(", ")})` }));
}

/**
 * The zone times are entered and shown in: the chosen site's; else the person's choice among their sites' zones;
 * else the first of those; UTC when there are no sites.
 */
export function effectiveZone(p: Pick<EventFilterParams, "site" | "tz">, sites: readonly ZoneSite[]): string {
  const site = p.site !== undefined ? sites.find((s) => s.id === p.site) : undefined;
  if (site) return site.timeZone;
  const choices = zoneChoices(sites);
  if (p.tz && (choices.some((c) => c.timeZone === p.tz) || (choices.length === 0 && p.tz === "UTC"))) return p.tz;
  return choices[0]?.timeZone ?? "UTC";
}

/** One row of the event log as the page, the JSON route and the CSV export show it. */
export type EventDto = {
  id: number;
  ts: number;
  kind: string;
  action: string;
  priority: Priority | null;
  siteId: number | null;
  siteName: string | null;
  timeZone: string | null;
  compressorId: number | null;
  compressorName: string | null;
  alarmId: number | null;
  actor: string;
  text: string;
};

/** GET /api/events */
export type EventsResponse = {
  events: EventDto[];
  /** Cursor of the next (older) page, "ts.id"; null at the end. */
  next: string | null;
  /** The search stopped at its budget before the page filled; older matches may exist beyond `next`. */
  partial: boolean;
  /** Zone the time range was read in. */
  zone: string;
};
