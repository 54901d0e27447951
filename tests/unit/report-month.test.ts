import { describe, expect, it } from "vitest";
import {
  localDateTime,
  monthHasBegun,
  monthLengthNote,
  monthOf,
  monthsEndingWith,
  monthWindow,
  previousMonth,
  shiftMonth,
  startOfLocalDay,
} from "@/shared/month";

const H = 3_600_000;

// Daylight-saving dates below are those of the IANA tz database (as shipped with Node's ICU):
// EU: last Sunday of March 01:00 UTC forward, last Sunday of October 01:00 UTC back (2026: 29 March, 25 October).
// US: second Sunday of March, first Sunday of November (2026: 8 March, 1 November).
// New South Wales: first Sunday of April back, first Sunday of October forward (2026: 5 April, 4 October).
// Chile: clocks go forward at local midnight on the first Sunday of September (2026: 6 September), so that
// midnight does not exist.

describe("month windows in a site's time zone (tz database)", () => {
  it("Europe/London March 2026 has 743 hours and says so", () => {
    const w = monthWindow("2026-03", "Europe/London");
    expect(w.hours).toBe(743);
    expect(w.nominalHours).toBe(744);
    expect(w.from).toBe(Date.UTC(2026, 2, 1, 0)); // GMT
    expect(w.to).toBe(Date.UTC(2026, 2, 31, 23)); // 1 April 00:00 BST
    expect(w.days).toHaveLength(31);
    const short = w.days.filter((d) => d.to - d.from !== 24 * H);
    expect(short.map((d) => [d.date, (d.to - d.from) / H])).toEqual([["2026-03-29", 23]]);
    expect(w.offsetAtStart).toBe("UTC+00:00");
    expect(w.offsetAtEnd).toBe("UTC+01:00");
    expect(monthLengthNote(w)).toMatch(/^743 h, not 744 h: in Europe\/London the clocks went forward/);
  });

  it("Europe/London October 2026 has 745 hours", () => {
    const w = monthWindow("2026-10", "Europe/London");
    expect(w.hours).toBe(745);
    expect(w.from).toBe(Date.UTC(2026, 8, 30, 23));
    expect(w.to).toBe(Date.UTC(2026, 10, 1, 0));
    expect(w.days.find((d) => d.date === "2026-10-25")!.to - w.days.find((d) => d.date === "2026-10-25")!.from).toBe(25 * H);
    expect(monthLengthNote(w)).toMatch(/745 h, not 744 h.*clocks went back/);
  });

  it("a month without a change is days × 24 hours and has no note", () => {
    const w = monthWindow("2026-02", "Europe/London");
    expect(w.hours).toBe(672);
    expect(monthLengthNote(w)).toBeNull();
    expect(monthWindow("2026-06", "Europe/Oslo").hours).toBe(720);
  });

  it("other hemispheres and zones", () => {
    expect(monthWindow("2026-03", "America/New_York").hours).toBe(743);
    expect(monthWindow("2026-11", "America/New_York").hours).toBe(721);
    expect(monthWindow("2026-04", "Australia/Sydney").hours).toBe(721);
    expect(monthWindow("2026-10", "Australia/Sydney").hours).toBe(743);
    // A half-hour zone: the month starts at 18:30 UTC the day before.
    const k = monthWindow("2026-03", "Asia/Kolkata");
    expect(k.from).toBe(Date.UTC(2026, 1, 28, 18, 30));
    expect(k.hours).toBe(744);
  });

  it("a day whose midnight does not exist starts at its first wall-clock time", () => {
    const t = startOfLocalDay(2026, 9, 6, "America/Santiago");
    expect(t).toBe(Date.UTC(2026, 8, 6, 4));
    expect(localDateTime(t, "America/Santiago")).toBe("2026-09-06 01:00");
    expect(localDateTime(t - 1, "America/Santiago")).toBe("2026-09-05 23:59");
    expect(monthWindow("2026-09", "America/Santiago").hours).toBe(719);
  });

  it("cuts the running month at now (month to date)", () => {
    const now = Date.UTC(2026, 2, 10, 12);
    const w = monthWindow("2026-03", "Europe/London", now);
    expect(w.partial).toBe(true);
    expect(w.to).toBe(now);
    expect(w.hours).toBe(743);
    expect(w.days).toHaveLength(10);
    expect(w.days[9]!.to).toBe(now);
  });

  it("month arithmetic", () => {
    expect(shiftMonth("2026-01", -1)).toBe("2025-12");
    expect(shiftMonth("2025-12", 13)).toBe("2027-01");
    expect(monthsEndingWith("2026-02", 3)).toEqual(["2025-12", "2026-01", "2026-02"]);
    // 31 March 23:30 UTC is already April in London (BST) but still March in New York.
    const t = Date.UTC(2026, 2, 31, 23, 30);
    expect(monthOf(t, "Europe/London")).toBe("2026-04");
    expect(monthOf(t, "America/New_York")).toBe("2026-03");
    expect(previousMonth(t, "Europe/London")).toBe("2026-03");
    expect(monthHasBegun("2026-04", Date.UTC(2026, 2, 31, 10))).toBe(true); // already April at UTC+14
    expect(monthHasBegun("2026-04", Date.UTC(2026, 2, 30, 0))).toBe(false);
  });
});
