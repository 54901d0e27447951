import type { BoardData, CompressorDetail } from "@/shared/board";
import type { LiveCompressor, LiveMessage } from "@/shared/live";

// How live values from two routes — the stored state read over HTTP and the socket's messages — are merged
// in the query cache. Pure, so the ordering rule is tested on its own.

type Versioned = { live: LiveCompressor | null; liveStamp: number };

/**
 * True when `b` is newer than `a`: the later reading wins; with the same reading, the later stamp
 * (a comms state change after the reading, or a flushed row that has caught up with the socket).
 */
export function isNewerLive(a: Versioned, b: Versioned): boolean {
  const ra = a.live?.receivedAt ?? -Infinity;
  const rb = b.live?.receivedAt ?? -Infinity;
  if (rb !== ra) return rb > ra;
  if (b.live && !a.live) return true;
  if (!b.live) return false;
  return b.liveStamp > a.liveStamp;
}

/**
 * Merges a freshly fetched board into the cached one: configuration from the fetch, and for each compressor
 * whichever live value is newer. Keeps unchanged objects so untouched tiles do not re-render.
 */
export function mergeBoardData(old: BoardData | undefined, next: BoardData): BoardData {
  if (!old) return next;
  const prev = new Map(old.compressors.map((c) => [c.id, c]));
  const compressors = next.compressors.map((c) => {
    const o = prev.get(c.id);
    if (!o) return c;
    const newer = isNewerLive(o, c);
    if (!newer && sameConfig(o, c)) return o;
    return newer ? c : { ...c, live: o.live, liveStamp: o.liveStamp };
  });
  const sites = sameSites(old, next) ? old.sites : next.sites;
  const unchanged =
    sites === old.sites && compressors.length === old.compressors.length && compressors.every((c, i) => c === old.compressors[i]);
  const at = Math.max(old.at, next.at);
  if (unchanged) return at === old.at ? old : { ...old, at };
  return { at, sites, compressors };
}

function sameConfig(a: BoardData["compressors"][number], b: BoardData["compressors"][number]): boolean {
  return (
    a.id === b.id &&
    a.name === b.name &&
    a.siteId === b.siteId &&
    a.modelName === b.modelName &&
    a.stages === b.stages &&
    a.ratedPressureBar === b.ratedPressureBar &&
    a.stopPressureBar === b.stopPressureBar &&
    a.restartPressureBar === b.restartPressureBar &&
    a.inService === b.inService &&
    a.service?.status === b.service?.status &&
    a.service?.overdue === b.service?.overdue &&
    a.service?.due === b.service?.due &&
    Math.round(a.cartridge?.usedPct ?? -1) === Math.round(b.cartridge?.usedPct ?? -1) &&
    a.cartridge?.advisoryPct === b.cartridge?.advisoryPct
  );
}

function sameSites(a: BoardData, b: BoardData): boolean {
  if (a.sites === b.sites) return true;
  if (a.sites.length !== b.sites.length) return false;
  return a.sites.every((s, i) => {
    const t = b.sites[i]!;
    return s.id === t.id && s.name === t.name && s.code === t.code && s.timeZone === t.timeZone;
  });
}

/** The compressors a message carries, each stamped with the message's server time. */
export function liveEntries(msg: LiveMessage): { live: LiveCompressor; liveStamp: number }[] {
  if (msg.type === "snapshot") return msg.compressors.map((live) => ({ live, liveStamp: msg.at }));
  if (msg.type === "update") return [{ live: msg.compressor, liveStamp: msg.at }];
  return [];
}

/** Applies socket values to a board; `unknown` lists compressors the board does not have (configuration changed). */
export function applyLiveToBoard(
  data: BoardData,
  entries: readonly { live: LiveCompressor; liveStamp: number }[],
): { data: BoardData; unknown: number[] } {
  if (!entries.length) return { data, unknown: [] };
  const byId = new Map(entries.map((e) => [e.live.compressorId, e]));
  const seen = new Set<number>();
  let changed = false;
  const compressors = data.compressors.map((c) => {
    const e = byId.get(c.id);
    if (!e) return c;
    seen.add(c.id);
    if (!isNewerLive(c, e)) return c;
    changed = true;
    return { ...c, live: e.live, liveStamp: e.liveStamp };
  });
  const unknown = entries.map((e) => e.live.compressorId).filter((id) => !seen.has(id));
  return { data: changed ? { ...data, compressors } : data, unknown };
}

export function applyLiveToDetail(data: CompressorDetail, entry: { live: LiveCompressor; liveStamp: number }): CompressorDetail {
  if (entry.live.compressorId !== data.compressor.id || !isNewerLive(data, entry)) return data;
  return { ...data, live: entry.live, liveStamp: entry.liveStamp };
}

/** Merges a fetched compressor detail into the cached one, keeping the newer live value. */
export function mergeDetail(old: CompressorDetail | undefined, next: CompressorDetail): CompressorDetail {
  if (!old || isNewerLive(old, next)) return next;
  return { ...next, live: old.live, liveStamp: old.liveStamp };
}
