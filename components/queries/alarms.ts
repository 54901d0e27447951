import { queryOptions, type QueryClient } from "@tanstack/react-query";
import type { AlarmCountsResponse, AlarmDto, AlarmsResponse } from "@/shared/alarm-schema";
import { alarmListQuery, type AlarmListParams } from "@/shared/alarm-list-params";
import { HttpError } from "./live";

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" }, cache: "no-store", credentials: "same-origin" });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: string } | null;
    throw new HttpError(res.status, body?.error ?? `${url} answered ${res.status}`);
  }
  return (await res.json()) as T;
}

/** Every alarm query key starts with this: one invalidation after an acknowledgement refreshes them all. */
export const alarmsKey = ["alarms"] as const;

/** The list is polled every few seconds; a pushed change can be written into the cache with applyAlarmUpdates. */
export const ALARM_POLL_MS = 4_000;

const noRetryWhenRefused = (count: number, error: Error) =>
  !(error instanceof HttpError && [401, 403, 404].includes(error.status)) && count < 2;

export const alarmQueries = {
  /** Alarms not back to normal in the person's sites, critical first then newest (GET /api/alarms). */
  list: (p: AlarmListParams = {}) =>
    queryOptions({
      queryKey: [...alarmsKey, "list", alarmListQuery(p)],
      queryFn: () => getJson<AlarmsResponse>(`/api/alarms?${alarmListQuery(p)}`),
      refetchInterval: ALARM_POLL_MS,
      staleTime: 2_000,
      retry: noRetryWhenRefused,
    }),
  /** Critical alarms only, for the announcement toast (polled every 5 s). */
  critical: () =>
    queryOptions({
      queryKey: [...alarmsKey, "list", alarmListQuery({ priority: "critical" })],
      queryFn: () => getJson<AlarmsResponse>(`/api/alarms?${alarmListQuery({ priority: "critical" })}`),
      refetchInterval: 5_000,
      refetchIntervalInBackground: true,
      staleTime: 2_000,
      retry: noRetryWhenRefused,
    }),
  /** One alarm in any state (an e-mail's link may name one that has since returned to normal). */
  one: (id: number) =>
    queryOptions({
      queryKey: [...alarmsKey, "one", id],
      queryFn: () => getJson<{ alarm: AlarmDto; at: number }>(`/api/alarms/${id}`),
      refetchInterval: ALARM_POLL_MS,
      retry: noRetryWhenRefused,
    }),
  /** Active alarms per compressor and priority, for board tiles (see components/alarms/alarm-badges.tsx). */
  counts: () =>
    queryOptions({
      queryKey: [...alarmsKey, "counts"],
      queryFn: () => getJson<AlarmCountsResponse>("/api/alarms/counts"),
      refetchInterval: ALARM_POLL_MS,
      retry: noRetryWhenRefused,
    }),
  /** The same counts for a wall screen, through its display link (no session there). */
  displayCounts: (token: string) =>
    queryOptions({
      queryKey: [...alarmsKey, "counts", "display", token],
      queryFn: () => getJson<AlarmCountsResponse>(`/api/display-links/${encodeURIComponent(token)}/alarm-counts`),
      refetchInterval: ALARM_POLL_MS,
      retry: noRetryWhenRefused,
    }),
};

function matches(p: URLSearchParams, a: AlarmDto): boolean {
  const num = (k: string) => (p.has(k) ? Number(p.get(k)) : undefined);
  if (num("site") !== undefined && a.siteId !== num("site")) return false;
  if (num("compressor") !== undefined && a.compressorId !== num("compressor")) return false;
  if (p.has("priority") && a.priority !== p.get("priority")) return false;
  if (p.has("state") && a.state !== p.get("state")) return false;
  return true;
}

/**
 * Writes changed alarms (e.g. pushed by the live hub, or returned by an action) into every cached list and
 * detail: replaced in place, added when new and matching the list's filters, dropped when back to normal.
 * The counts are refetched. The next poll confirms whatever this did.
 */
export function applyAlarmUpdates(client: QueryClient, changed: readonly AlarmDto[]): void {
  if (!changed.length) return;
  const byId = new Map(changed.map((a) => [a.id, a]));
  for (const [key, data] of client.getQueriesData<AlarmsResponse>({ queryKey: [...alarmsKey, "list"] })) {
    if (!data) continue;
    const params = new URLSearchParams(String(key[2] ?? ""));
    const kept = data.alarms.filter((a) => !byId.has(a.id));
    const fresh = changed.filter((a) => a.state !== "normal" && matches(params, a));
    const alarms = [...kept, ...fresh].sort(
      (a, b) => rank(a) - rank(b) || b.raisedAt - a.raisedAt || b.id - a.id,
    );
    client.setQueryData<AlarmsResponse>(key, { ...data, alarms });
  }
  for (const a of changed) {
    client.setQueryData<{ alarm: AlarmDto; at: number }>(alarmQueries.one(a.id).queryKey, (old) => (old ? { ...old, alarm: a } : old));
  }
  void client.invalidateQueries({ queryKey: alarmQueries.counts().queryKey });
}

const rank = (a: AlarmDto) => (a.priority === "critical" ? 0 : a.priority === "warning" ? 1 : 2);
