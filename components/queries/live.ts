import { queryOptions, type QueryClient } from "@tanstack/react-query";
import type { DisplayLinkDto } from "@/shared/display-link-schema";
import type { BoardData, CompressorDetail } from "@/shared/board";
import type { LiveMessage } from "@/shared/live";
import { applyLiveToBoard, applyLiveToDetail, liveEntries, mergeBoardData, mergeDetail } from "../board/live-merge";

/** A failed request, with its HTTP status (a revoked display link answers 410). */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    message: string,
  ) {
    super(message);
  }
}

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" }, cache: "no-store", credentials: "same-origin" });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: string } | null;
    throw new HttpError(res.status, body?.error ?? `${url} answered ${res.status}`);
  }
  return (await res.json()) as T;
}

/** Whose board: the signed-in person's (their sites) or a wall screen's display link (the link's sites). */
export type BoardSource = { kind: "user" } | { kind: "display"; token: string };

const enc = encodeURIComponent;

export function liveTokenUrl(source: BoardSource): string {
  return source.kind === "user" ? "/api/live/token" : `/api/display-links/${enc(source.token)}/live-token`;
}

function boardUrl(source: BoardSource): string {
  return source.kind === "user" ? "/api/live/board" : `/api/display-links/${enc(source.token)}/board`;
}

/** Every board query key starts with this; socket messages are applied to all of them. */
export const boardKey = ["board"] as const;
export const compressorDetailKey = (id: number) => ["compressor", id, "detail"] as const;

// A refused board (revoked link, ended session) is not retried; anything else is, once.
const retryUnlessRefused = (count: number, error: Error) =>
  !(error instanceof HttpError && [401, 403, 404, 410].includes(error.status)) && count < 1;

export const liveQueries = {
  /** Sites, compressors and last stored state; the live socket then keeps `live` current in the cache. */
  board: (source: BoardSource) =>
    queryOptions({
      queryKey: source.kind === "user" ? [...boardKey, "user"] : [...boardKey, "display", source.token],
      queryFn: () => getJson<BoardData>(boardUrl(source)),
      structuralSharing: (old, next) => mergeBoardData(old as BoardData | undefined, next as BoardData),
      retry: retryUnlessRefused,
    }),
  /** One compressor's configuration and last stored state, kept current by the socket. */
  compressor: (id: number) =>
    queryOptions({
      queryKey: compressorDetailKey(id),
      queryFn: () => getJson<CompressorDetail>(`/api/compressors/${id}`),
      structuralSharing: (old, next) => mergeDetail(old as CompressorDetail | undefined, next as CompressorDetail),
      retry: retryUnlessRefused,
    }),
};

export const displayLinkQueries = {
  list: () =>
    queryOptions({
      queryKey: ["admin", "display-links"],
      queryFn: () => getJson<{ links: DisplayLinkDto[] }>("/api/display-links").then((r) => r.links),
    }),
};

/**
 * Writes a socket message into the cache: every board and the detail of each compressor it names.
 * A snapshot naming a compressor no board knows means the fleet changed: the boards are refetched.
 */
export function applyLiveMessage(client: QueryClient, msg: LiveMessage): void {
  const entries = liveEntries(msg);
  if (!entries.length) return;
  let unknown = false;
  client.setQueriesData<BoardData>({ queryKey: boardKey }, (old) => {
    if (!old) return old;
    const r = applyLiveToBoard(old, entries);
    if (r.unknown.length) unknown = true;
    return r.data;
  });
  for (const entry of entries) {
    client.setQueryData<CompressorDetail>(compressorDetailKey(entry.live.compressorId), (old) =>
      old ? applyLiveToDetail(old, entry) : old,
    );
  }
  if (unknown && msg.type === "snapshot") void client.invalidateQueries({ queryKey: boardKey });
}
