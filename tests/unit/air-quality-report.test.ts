import { describe, expect, it } from "vitest";
import { airMonthOf } from "@/shared/air-quality-report";

const DAY = 86_400_000;
const from = Date.UTC(2026, 5, 1); // June 2026, 30 days
const to = Date.UTC(2026, 6, 1);

describe("air-quality month figures (hand-worked)", () => {
  it("a test due on 10 June, done on 15 June: 5 overdue days, then due again in 91 days", () => {
    const last = from + 9 * DAY - 91 * DAY; // due = last + 91 d = 10 June 00:00
    const m = airMonthOf({ from, to, now: to + DAY, intervalDays: 91, since: 0, tests: [{ sampledAt: last, passed: true }, { sampledAt: from + 14 * DAY, passed: false }] });
    expect(m).toEqual({ due: 1, done: 1, passed: 0, failed: 1, overdueDays: 5 });
  });

  it("overdue all month with no test: 30 days; the current month counts only up to now", () => {
    expect(airMonthOf({ from, to, now: to, intervalDays: 30, since: from - 60 * DAY, tests: [] }).overdueDays).toBe(30);
    expect(airMonthOf({ from, to, now: from + 12 * DAY, intervalDays: 30, since: from - 60 * DAY, tests: [] }).overdueDays).toBe(12);
  });

  it("not due this month: nothing due, nothing overdue", () => {
    const m = airMonthOf({ from, to, now: to, intervalDays: 91, since: 0, tests: [{ sampledAt: from - 10 * DAY, passed: true }] });
    expect(m).toEqual({ due: 0, done: 0, passed: 0, failed: 0, overdueDays: 0 });
  });
});
