import { afterEach, describe, expect, it } from "vitest";
import { backfillStatus, clearHistoryBackfill, historyBackfillMark, markHistoryBackfill } from "@/db/history-backfill";
import { backfillProgress } from "@/simulator/backfill-progress";
import { makeTempDb, type TempDb } from "./ingest-fixtures";

let t: TempDb;
afterEach(() => t?.cleanup());

describe("backfill progress", () => {
  it("prints a line at most every interval and keeps the percentage on the history mark", () => {
    t = makeTempDb("airkeep-backfill-progress-");
    let clock = 1_000_000;
    markHistoryBackfill(t.db, 4242, clock);
    const lines: string[] = [];
    const report = backfillProgress(t.db, (l) => lines.push(l), { everyMs: 5_000, now: () => clock, pid: 4242 });

    report(100, 1_000); // first call prints
    clock += 1_000;
    report(200, 1_000); // within 5 s: nothing
    clock += 5_000;
    report(370, 1_000);
    expect(lines).toHaveLength(2);
    expect(lines[1]).toMatch(/^history 37 % written \(370 of 1,000 readings\), about \d+ s left$/);
    expect(historyBackfillMark(t.db)).toEqual({ pid: 4242, since: 1_000_000, percent: 37 });

    clock += 100;
    report(1_000, 1_000); // the end always prints
    expect(lines).toHaveLength(3);
    expect(lines[2]).toBe("history 100 % written (1,000 of 1,000 readings)");
  });

  it("the web sees a running backfill only while its mark stands and its process lives", () => {
    t = makeTempDb("airkeep-backfill-progress-");
    expect(backfillStatus(t.db, () => true)).toBeNull();
    markHistoryBackfill(t.db, 77, 5_000);
    expect(backfillStatus(t.db, (pid) => pid === 77)).toEqual({ running: true, percent: 0, since: 5_000 });
    expect(backfillStatus(t.db, () => false)).toBeNull(); // the job died
    clearHistoryBackfill(t.db);
    expect(backfillStatus(t.db, () => true)).toBeNull();
  });
});
