import { queryOptions } from "@tanstack/react-query";
import type { BacktestMessage, BacktestRequest, BacktestResult } from "@/shared/backtest";
import type { ScopeType, ThresholdHistoryEntry, ThresholdOverviewDto, ThresholdSetDto } from "@/shared/threshold-schema";
import { HttpError } from "./live";

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" }, cache: "no-store", credentials: "same-origin" });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: string } | null;
    throw new HttpError(res.status, body?.error ?? `${url} answered ${res.status}`);
  }
  return (await res.json()) as T;
}

/** Every thresholds query key starts with this, so a save can refresh them all. */
export const thresholdsKey = ["thresholds"] as const;

export const thresholdQueries = {
  overview: () =>
    queryOptions({
      queryKey: [...thresholdsKey, "overview"],
      queryFn: () => getJson<ThresholdOverviewDto>("/api/thresholds"),
    }),
  /** One set with what it inherits; refreshed now and then so a colleague's save shows while editing. */
  set: (scopeType: ScopeType, scopeId: number) =>
    queryOptions({
      queryKey: [...thresholdsKey, "set", scopeType, scopeId],
      queryFn: () => getJson<ThresholdSetDto>(`/api/thresholds/${scopeType}/${scopeId}`),
      refetchInterval: 15_000,
    }),
  history: (scopeType: ScopeType, scopeId: number) =>
    queryOptions({
      queryKey: [...thresholdsKey, "history", scopeType, scopeId],
      queryFn: () => getJson<{ entries: ThresholdHistoryEntry[] }>(`/api/thresholds/${scopeType}/${scopeId}/history`).then((r) => r.entries),
    }),
};

/**
 * Runs a backtest on the server, reading its streamed progress (NDJSON) as it comes; resolves with the result.
 * Aborting the signal closes the request, which stops the work on the server.
 */
export async function streamBacktest(
  request: BacktestRequest,
  onProgress: (fraction: number, phase: "raw" | "1m") => void,
  signal?: AbortSignal,
): Promise<BacktestResult> {
  const res = await fetch("/api/thresholds/backtest", {
    method: "POST",
    headers: { "content-type": "application/json", accept: "application/x-ndjson" },
    credentials: "same-origin",
    body: JSON.stringify(request),
    signal,
  });
  if (!res.ok || !res.body) {
    const body = (await res.json().catch(() => null)) as { error?: string } | null;
    throw new HttpError(res.status, body?.error ?? `The backtest answered ${res.status}`);
  }
  const reader = res.body.pipeThrough(new TextDecoderStream()).getReader();
  let buffer = "";
  for (;;) {
    const { done, value } = await reader.read();
    if (value) buffer += value;
    let nl: number;
    while ((nl = buffer.indexOf("\n")) >= 0) {
      const line = buffer.slice(0, nl).trim();
      buffer = buffer.slice(nl + 1);
      if (!line) continue;
      const m = JSON.parse(line) as BacktestMessage;
      if (m.type === "progress") onProgress(m.fraction, m.phase);
      else if (m.type === "result") return m.result;
      else throw new HttpError(m.status, m.error);
    }
    if (done) break;
  }
  throw new HttpError(502, "The backtest stopped before it finished. Try again.");
}
