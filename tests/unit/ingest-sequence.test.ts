import { describe, expect, it } from "vitest";
import { createSequenceGuard, judgeSequence, type Neighbours, type SequencePoint } from "@/lib/ingester/sequence";

/** Neighbours of a millisecond among held readings, as the store and the pending batch report them. */
function held(points: SequencePoint[]) {
  return (ts: number): Neighbours => {
    const before = points.filter((p) => p.ts < ts).sort((a, b) => b.ts - a.ts)[0] ?? null;
    const after = points.filter((p) => p.ts > ts).sort((a, b) => a.ts - b.ts)[0] ?? null;
    return { at: points.find((p) => p.ts === ts)?.seq ?? null, before, after };
  };
}

// A run of readings: seq 90 at 40 s, 95 at 45 s, 100 at 50 s (the head).
const run = [
  { seq: 90, ts: 40_000 },
  { seq: 95, ts: 45_000 },
  { seq: 100, ts: 50_000 },
];
const head = run[2]!;
const around = held(run);

describe("judgeSequence", () => {
  it.each([
    ["the next reading", 101, 51_000, false, "next"],
    ["a later reading after a gap in seq (QoS 0 losses)", 140, 90_000, false, "next"],
    ["the same seq re-stamped later", 100, 51_000, false, "seqRepeated"],
    ["the same seq re-stamped earlier", 100, 49_000, false, "seqRepeated"],
    ["an older seq re-stamped between others", 95, 47_000, false, "seqRepeated"],
    ["a lower seq stamped later, no reconnect", 40, 51_000, false, "seqBackwards"],
    ["a lower seq stamped later after the device reconnected", 40, 51_000, true, "restart"],
    ["seq starting over at 0 stamped later", 0, 51_000, false, "restart"],
    ["seq starting over at 1 stamped later", 1, 51_000, false, "restart"],
    ["seq at 2 stamped later, no reconnect", 2, 51_000, false, "seqBackwards"],
    ["a lower seq stamped earlier than readings with higher seq, even after a reconnect", 40, 49_000, true, "seqBackwards"],
    ["a higher seq stamped earlier (clock stepped back)", 101, 49_000, false, "tsBackwards"],
    ["an exact resend of the last reading", 100, 50_000, false, "duplicate"],
    ["an exact resend of an older reading", 90, 40_000, false, "duplicate"],
    ["another reading in the last reading's millisecond", 101, 50_000, false, "sameTimestamp"],
    ["another reading in an older reading's millisecond", 91, 40_000, false, "sameTimestamp"],
    ["a late reading that fits between its neighbours", 97, 47_000, false, "late"],
    ["a late reading older than everything held", 80, 30_000, false, "late"],
    ["a late reading whose seq is too high for its time", 99, 44_000, false, "tsBackwards"],
  ] as const)("%s → %s", (_label, seq, ts, reconnected, verdict) => {
    expect(judgeSequence(head, seq, ts, reconnected, around)).toBe(verdict);
  });

  it("takes the first reading of a device unless its millisecond is held", () => {
    const nothing = held([]);
    expect(judgeSequence(undefined, 7, 1_000, false, nothing)).toBe("next");
    expect(judgeSequence(undefined, 7, 1_000, false, held([{ seq: 7, ts: 1_000 }]))).toBe("duplicate");
    expect(judgeSequence(undefined, 8, 1_000, false, held([{ seq: 7, ts: 1_000 }]))).toBe("sameTimestamp");
  });

  it("does not look anything up on the common path", () => {
    const lookup = (): Neighbours => {
      throw new Error("looked up");
    };
    expect(judgeSequence(head, 101, 51_000, false, lookup)).toBe("next");
    expect(judgeSequence(head, 3, 51_000, true, lookup)).toBe("restart");
    expect(judgeSequence(head, 100, 50_000, false, lookup)).toBe("duplicate");
  });
});

describe("createSequenceGuard", () => {
  it("moves the head only for the newest stored reading, and lets a reconnect open one restart", () => {
    const g = createSequenceGuard([[1, { seq: 10, ts: 1_000 }]], () => ({ at: null, before: null, after: null }));
    expect(g.check(1, 11, 2_000)).toBe("next");
    expect(g.check(1, 11, 3_000)).toBe("seqRepeated");
    expect(g.check(1, 12, 2_500)).toBe("next");
    expect(g.check(1, 5, 4_000)).toBe("seqBackwards");
    g.reconnected(1);
    expect(g.check(1, 5, 4_000)).toBe("restart");
    expect(g.check(1, 6, 5_000)).toBe("next");
    // The reconnect allowed one new run, not another one later.
    expect(g.check(1, 3, 6_000)).toBe("seqBackwards");
    // Devices are judged apart.
    expect(g.check(2, 3, 1)).toBe("next");
  });
});
