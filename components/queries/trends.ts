import { keepPreviousData, queryOptions } from "@tanstack/react-query";
import type { DeviceEventDto } from "@/shared/board";
import type { DeliveryHealthResponse } from "@/shared/delivery-health";
import { trendSpanMs, type TrendResponse, type TrendSignal, type TrendSpan } from "@/shared/board";
import { HttpError } from "./live";

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" }, credentials: "same-origin" });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: string } | null;
    throw new HttpError(res.status, body?.error ?? `${url} answered ${res.status}`);
  }
  return (await res.json()) as T;
}

/** How often a span's chart refreshes: every few seconds for minutes, every few minutes for months. */
export function trendRefreshMs(span: TrendSpan): number {
  return Math.min(10 * 60_000, Math.max(5_000, trendSpanMs[span] / 180));
}

export const trendQueries = {
  /** [t, mean, min, max] in bar / °C, converted to the person's unit when drawn. */
  trend: (compressorId: number, signal: TrendSignal, span: TrendSpan) =>
    queryOptions({
      queryKey: ["compressor", compressorId, "trend", signal, span],
      queryFn: () => getJson<TrendResponse>(`/api/compressors/${compressorId}/trend?signal=${signal}&span=${span}`),
      staleTime: trendRefreshMs(span),
      refetchInterval: trendRefreshMs(span),
      placeholderData: keepPreviousData,
    }),
  /** An hour of one alarm's signal around the time it was raised (`finalStageC` means the last fitted stage). */
  around: (compressorId: number, signal: TrendSignal | "finalStageC", raisedAt: number) => {
    const end = raisedAt + 30 * 60_000;
    return queryOptions({
      queryKey: ["compressor", compressorId, "trend-around", signal, end],
      queryFn: () => getJson<TrendResponse>(`/api/compressors/${compressorId}/trend?signal=${signal}&span=1h&end=${end}`),
      staleTime: 15_000,
      refetchInterval: (q) => (q.state.data && q.state.data.to < Date.now() - 60_000 ? false : 15_000),
    });
  },
  /** Free air delivered per measured fill, and the advisory's judgement of the last fills. */
  deliveries: (compressorId: number) =>
    queryOptions({
      queryKey: ["compressor", compressorId, "deliveries"],
      queryFn: () => getJson<DeliveryHealthResponse>(`/api/compressors/${compressorId}/deliveries`),
      refetchInterval: 60_000,
    }),
  /** Comms, state-change and trip events of one compressor, newest first. */
  events: (compressorId: number) =>
    queryOptions({
      queryKey: ["compressor", compressorId, "events"],
      queryFn: () => getJson<{ events: DeviceEventDto[] }>(`/api/compressors/${compressorId}/events?limit=100`).then((r) => r.events),
      refetchInterval: 30_000,
    }),
};
