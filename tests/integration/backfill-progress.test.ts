import { afterEach, describe, expect, it } from "vitest";
import { readBackfillStatus } from "@/db/history-status";
import { backfillProgress } from "@/simulator/backfill-progress";
import { makeTempDb, type TempDb } from "./ingest-fixtures";

let t: TempDb;
afterEach(() => t?.cleanup());

describe("backfill progress", () => {
  it("prints a line at most every interval, records the percentage, and ends not running", () => {
    t = makeTempDb("airkeep-backfill-progress-");
    let clock = 1_000_000;
    const lines: string[] = [];
    const report = backfillProgress(t.db, (l) => lines.push(l), { everyMs: 5_000, now: () => clock });
    expect(readBackfillStatus(t.db, clock)).toMatchObject({ running: true, percent: 0 });

    report(100, 1_000); // first call prints
    clock += 1_000;
    report(200, 1_000); // within 5 s: nothing
    clock += 5_000;
    report(370, 1_000);
    expect(lines).toHaveLength(2);
    expect(lines[1]).toMatch(/^history 37 % written \(370 of 1,000 readings\), about \d+ s left$/);
    expect(readBackfillStatus(t.db, clock)).toMatchObject({ running: true, percent: 37 });

    clock += 100;
    report(1_000, 1_000); // the end always prints
    expect(lines).toHaveLength(3);
    expect(lines[2]).toBe("history 100 % written (1,000 of 1,000 readings)");
    expect(readBackfillStatus(t.db, clock)).toMatchObject({ running: false, percent: 100 });
  });

  it("a running status that has gone silent reads as not running (the job died)", () => {
    t = makeTempDb("airkeep-backfill-progress-");
    const clock = 5_000_000;
    backfillProgress(t.db, () => {}, { now: () => clock });
    expect(readBackfillStatus(t.db, clock + 60_000)?.running).toBe(true);
    expect(readBackfillStatus(t.db, clock + 121_000)?.running).toBe(false);
  });
});
