// The sequence rule for a device's readings (README, "Sequence rule"). Within one run of the gateway, seq and ts
// order the readings the same way. A gateway restart may start seq again lower, but only with a later ts, and only
// right after the device announced itself online again or when seq starts over at 0 or 1. A reading that arrives
// late (a client resending after a reconnect may reorder) is kept if it fits between its stored neighbours in both
// orders. Anything else is a resend of a stored reading (idempotent, counted `duplicate`) or rejected and counted.

/** Rejections by the sequence rule, as counted in the ingester's `rejects`. */
export const sequenceRejectReasons = ["seqRepeated", "seqBackwards", "tsBackwards", "sameTimestamp"] as const;
export type SequenceRejectReason = (typeof sequenceRejectReasons)[number];

/**
 * next      — the following reading of this run: stored
 * late      — an earlier reading not seen before that fits between its neighbours by seq and by ts: stored
 * restart   — the first reading of a new run after a gateway restart: stored
 * duplicate — a resend of a stored (or pending) reading with the same seq and ts: not stored again
 * seqRepeated   — a seq already held, with another ts (a re-stamped resend)
 * seqBackwards  — a seq lower than its place in time allows, and no restart: a stale or replayed reading
 * tsBackwards   — a seq higher than its place in time allows (the gateway's clock went back)
 * sameTimestamp — another reading in a millisecond that already holds one (a stuck or coarse clock)
 */
export type SequenceVerdict = "next" | "late" | "restart" | "duplicate" | SequenceRejectReason;

export type SequencePoint = { seq: number; ts: number };

/** What is held (stored or pending) around a millisecond: the reading at it, and the nearest before and after. */
export type Neighbours = { at: number | null; before: SequencePoint | null; after: SequencePoint | null };

/** A restart without a fresh `online` is recognised only when seq starts over from here or below. */
export const RESTART_SEQ_MAX = 1;

/**
 * Judges one reading against the last accepted reading of its device (`head`; undefined before the first).
 * `around(ts)` is asked only off the common path. `reconnected`: the device published `online` since its head.
 */
export function judgeSequence(
  head: SequencePoint | undefined,
  seq: number,
  ts: number,
  reconnected: boolean,
  around: (ts: number) => Neighbours,
): SequenceVerdict {
  if (head && ts > head.ts) {
    if (seq > head.seq) return "next";
    if (seq === head.seq) return "seqRepeated";
    return reconnected || seq <= RESTART_SEQ_MAX ? "restart" : "seqBackwards";
  }
  if (head && ts === head.ts) return seq === head.seq ? "duplicate" : "sameTimestamp";
  const n = around(ts);
  if (n.at === seq) return "duplicate";
  if (n.at !== null) return "sameTimestamp";
  if (n.before?.seq === seq || n.after?.seq === seq) return "seqRepeated";
  if (n.before && seq < n.before.seq) return "seqBackwards";
  if (n.after && seq > n.after.seq) return "tsBackwards";
  return head ? "late" : "next";
}

export type SequenceGuard = {
  /** Judges a reading and, when it is the device's newest, makes it the head. */
  check(compressorId: number, seq: number, ts: number): SequenceVerdict;
  /** The device (re)connected: its next reading may start a new run. */
  reconnected(compressorId: number): void;
};

export function createSequenceGuard(
  heads: Iterable<readonly [number, SequencePoint]>,
  around: (compressorId: number, ts: number) => Neighbours,
): SequenceGuard {
  const byDevice = new Map(heads);
  const fresh = new Set<number>();
  return {
    check(compressorId, seq, ts) {
      const v = judgeSequence(byDevice.get(compressorId), seq, ts, fresh.has(compressorId), (t) => around(compressorId, t));
      if (v === "next" || v === "restart") {
        byDevice.set(compressorId, { seq, ts });
        fresh.delete(compressorId);
      }
      return v;
    },
    reconnected: (compressorId) => void fresh.add(compressorId),
  };
}
