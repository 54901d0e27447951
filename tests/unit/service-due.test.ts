import { describe, expect, it } from "vitest";
import { addLocalMonths, computeDue, type DueInput } from "@/shared/service-due";

// Hand-worked examples. Time-zone rules from the IANA tz database: Europe/London moves to BST (UTC+1) on the last
// Sunday of March (29 Mar 2026, 01:00 UTC); Australia/Sydney leaves AEDT (UTC+11) for AEST (UTC+10) on the first Sunday
// of April (5 Apr 2026, 03:00 local); America/New_York is on EST (UTC−5) in February and early March 2026.

const H = 3_600_000;
const base: Omit<DueInput, "now" | "lastAt"> = {
  everyHours: null,
  everyMonths: null,
  lastHours: null,
  hourMeterH: null,
  hoursPerDay: null,
  timeZone: "Europe/London",
  leadHours: 50,
  leadDays: 14,
};
const at = (iso: string) => Date.parse(iso);

describe("calendar due across a daylight-saving change", () => {
  // Done 15 Jan 2026 10:00 GMT, every 3 months → due by 15 Apr 2026 (local). Overdue from 16 Apr 00:00 BST,
  // which is 15 Apr 23:00 UTC — not midnight UTC, and not 91 × 24 h after the service.
  const task = { ...base, everyMonths: 3, lastAt: at("2026-01-15T10:00:00Z") };

  it("gives the local due date and the UTC instant it turns overdue", () => {
    const r = computeDue({ ...task, now: at("2026-02-01T00:00:00Z") });
    expect(r.dueDate).toBe("2026-04-15");
    expect(r.overdueAt).toBe(at("2026-04-15T23:00:00Z"));
    expect(r.status).toBe("ok");
    // The forecast is the calendar date: 15 Apr 00:00 BST = 14 Apr 23:00 UTC.
    expect(r.forecastAt).toBe(at("2026-04-14T23:00:00Z"));
    expect(r.firstBy).toBe("calendar");
  });

  it("comes due 14 local days before: from 1 Apr 00:00 BST = 31 Mar 23:00 UTC", () => {
    expect(computeDue({ ...task, now: at("2026-03-31T22:59:59Z") }).status).toBe("ok");
    expect(computeDue({ ...task, now: at("2026-03-31T23:00:00Z") }).status).toBe("due");
  });

  it("is overdue from the first instant of 16 Apr local time, not before", () => {
    expect(computeDue({ ...task, now: at("2026-04-15T22:59:59.999Z") }).status).toBe("due");
    expect(computeDue({ ...task, now: at("2026-04-15T23:00:00Z") }).status).toBe("overdue");
  });

  it("southern hemisphere: done 10 Mar 09:00 AEDT, monthly → overdue from 11 Apr 00:00 AEST = 10 Apr 14:00 UTC", () => {
    const r = computeDue({ ...base, timeZone: "Australia/Sydney", everyMonths: 1, lastAt: at("2026-03-09T22:00:00Z"), now: at("2026-04-10T13:59:59Z") });
    expect(r.dueDate).toBe("2026-04-10");
    expect(r.overdueAt).toBe(at("2026-04-10T14:00:00Z"));
    expect(r.status).toBe("due");
    expect(computeDue({ ...base, timeZone: "Australia/Sydney", everyMonths: 1, lastAt: at("2026-03-09T22:00:00Z"), now: at("2026-04-10T14:00:00Z") }).status).toBe(
      "overdue",
    );
  });

  it("the 31st becomes the last day of a shorter month", () => {
    // 31 Jan 2026 23:30 EST is 1 Feb 04:30 UTC: the local date counts, so one month later is 28 Feb 2026.
    expect(addLocalMonths(at("2026-02-01T04:30:00Z"), 1, "America/New_York")).toEqual({ year: 2026, month: 2, day: 28 });
    const r = computeDue({ ...base, timeZone: "America/New_York", everyMonths: 1, lastAt: at("2026-02-01T04:30:00Z"), now: at("2026-02-01T05:00:00Z") });
    expect(r.overdueAt).toBe(at("2026-03-01T05:00:00Z"));
    // 31 Aug 2026 + 6 months → 28 Feb 2027.
    expect(addLocalMonths(at("2026-08-31T12:00:00Z"), 6, "Europe/London")).toEqual({ year: 2027, month: 2, day: 28 });
  });
});

describe("run-hour due and the forecast", () => {
  // Last done at 1,000 h, every 500 h → due at 1,500 h; with a 50 h lead it comes due at 1,450 h.
  const task = { ...base, everyHours: 500, lastHours: 1000, lastAt: at("2026-01-10T08:00:00Z"), now: at("2026-03-01T12:00:00Z") };

  it("ok, due and overdue by the meter", () => {
    expect(computeDue({ ...task, hourMeterH: 1449 })).toMatchObject({ status: "ok", dueHours: 1500, hoursLeft: 51 });
    expect(computeDue({ ...task, hourMeterH: 1450 })).toMatchObject({ status: "due", hoursLeft: 50 });
    expect(computeDue({ ...task, hourMeterH: 1500 })).toMatchObject({ status: "overdue", hoursLeft: 0 });
  });

  it("forecasts from run hours per day: 200 h left at 4 h a day is 50 days", () => {
    const r = computeDue({ ...task, hourMeterH: 1300, hoursPerDay: 4 });
    expect(r.forecastAt).toBe(task.now + 50 * 24 * H);
    expect(r.firstBy).toBe("hours");
  });

  it("no forecast by hours for an idle compressor", () => {
    expect(computeDue({ ...task, hourMeterH: 1300, hoursPerDay: 0 })).toMatchObject({ forecastAt: null, firstBy: null, status: "ok" });
  });
});

describe("whichever comes first", () => {
  // Every 500 h or 12 months. Done 1 Jun 2025 at 2,000 h (London, BST).
  const task = { ...base, everyHours: 500, everyMonths: 12, lastHours: 2000, lastAt: at("2025-06-01T09:00:00Z") };

  it("hours first: 2,510 h on 1 Nov 2025 is overdue though the calendar date is months away", () => {
    expect(computeDue({ ...task, hourMeterH: 2510, now: at("2025-11-01T12:00:00Z") })).toMatchObject({ status: "overdue", dueDate: "2026-06-01" });
  });

  it("calendar first: 2,100 h on 2 Jun 2026 (BST) is overdue by the calendar", () => {
    // Due by 1 Jun 2026; overdue from 2 Jun 00:00 BST = 1 Jun 23:00 UTC.
    expect(computeDue({ ...task, hourMeterH: 2100, now: at("2026-06-01T22:59:00Z") }).status).toBe("due");
    expect(computeDue({ ...task, hourMeterH: 2100, now: at("2026-06-01T23:00:00Z") }).status).toBe("overdue");
  });

  it("forecast is the earlier of the two: 100 h left at 2 h/day (50 days) against the calendar", () => {
    const now = at("2026-03-01T12:00:00Z");
    const r = computeDue({ ...task, hourMeterH: 2400, hoursPerDay: 2, now });
    expect(r.firstBy).toBe("hours");
    expect(r.forecastAt).toBe(now + 50 * 24 * H);
    const slow = computeDue({ ...task, hourMeterH: 2400, hoursPerDay: 0.5, now });
    // 200 days would be September; 1 Jun 2026 00:00 BST (31 May 23:00 UTC) comes first.
    expect(slow.firstBy).toBe("calendar");
    expect(slow.forecastAt).toBe(at("2026-05-31T23:00:00Z"));
  });
});

describe("an hour meter not known at the last service", () => {
  it("judges by the calendar only, rather than counting from zero", () => {
    const r = computeDue({ ...base, everyHours: 500, everyMonths: 12, lastHours: null, hourMeterH: 3200, lastAt: at("2026-01-10T08:00:00Z"), now: at("2026-03-01T12:00:00Z") });
    expect(r).toMatchObject({ status: "ok", dueHours: null, hoursLeft: null, dueDate: "2027-01-10" });
  });
});
