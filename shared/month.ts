import { z } from "zod";

// Calendar months and days in a site's own time zone (IANA tz database through Intl), as UTC millisecond windows.
// A month runs from local midnight on its first day to local midnight on the first day of the next; a month with a
// daylight-saving change is an hour shorter or longer than its days × 24 (Europe/London: March 2026 has 743 hours,
// October 2026 has 745).

export const HOUR_MS = 3_600_000;
export const DAY_MS = 86_400_000;

/** "2026-03" */
export const monthSchema = z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, "A month as yyyy-mm");
export type Month = string;

export type DayWindow = {
  /** Local date, "yyyy-mm-dd". */
  date: string;
  from: number;
  to: number;
};

export type MonthWindow = {
  month: Month;
  timeZone: string;
  /** UTC ms of local midnight starting the month. */
  from: number;
  /** UTC ms of local midnight starting the next month, or `now` while the month is still running. */
  to: number;
  /** End of the whole month, whether or not it has come. */
  monthEnd: number;
  /** True when `to` was cut at `now` (month to date). */
  partial: boolean;
  /** Hours in the whole month (743, 744, 745 … with a daylight-saving change). */
  hours: number;
  /** Days × 24. */
  nominalHours: number;
  /** Days of the month, cut at `to` when partial (days not yet begun are left out). */
  days: DayWindow[];
  /** UTC offsets in force at the start and the end of the month, e.g. "UTC+00:00" and "UTC+01:00". */
  offsetAtStart: string;
  offsetAtEnd: string;
};

const pad2 = (n: number) => String(n).padStart(2, "0");

export function parseMonth(month: Month): { year: number; month: number } {
  const m = monthSchema.parse(month);
  return { year: Number(m.slice(0, 4)), month: Number(m.slice(5, 7)) };
}

export function formatMonth(year: number, month: number): Month {
  const d = new Date(Date.UTC(year, month - 1, 1));
  return `${d.getUTCFullYear()}-${pad2(d.getUTCMonth() + 1)}`;
}

/** The month `n` months after (negative: before) `month`. */
export function shiftMonth(month: Month, n: number): Month {
  const { year, month: m } = parseMonth(month);
  return formatMonth(year, m + n);
}

/** The `count` months ending with `month`, oldest first. */
export function monthsEndingWith(month: Month, count: number): Month[] {
  return Array.from({ length: count }, (_, i) => shiftMonth(month, i - count + 1));
}

/** "March 2026" */
export function monthLabel(month: Month): string {
  const { year, month: m } = parseMonth(month);
  return new Intl.DateTimeFormat("en-GB", { month: "long", year: "numeric", timeZone: "UTC" }).format(Date.UTC(year, m - 1, 1));
}

const partsFormats = new Map<string, Intl.DateTimeFormat>();

function partsFormat(timeZone: string): Intl.DateTimeFormat {
  let f = partsFormats.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat("en-US", {
      timeZone,
      hourCycle: "h23",
      year: "numeric",
      month: "2-digit",
      day: "2-digit",
      hour: "2-digit",
      minute: "2-digit",
      second: "2-digit",
    });
    partsFormats.set(timeZone, f);
  }
  return f;
}

export type LocalParts = { year: number; month: number; day: number; hour: number; minute: number; second: number };

/** Wall-clock date and time at `ts` in `timeZone`. */
export function localParts(ts: number, timeZone: string): LocalParts {
  const out: Record<string, number> = {};
  for (const p of partsFormat(timeZone).formatToParts(ts)) {
    if (p.type !== "literal") out[p.type] = Number(p.value);
  }
  return {
    year: out.year!,
    month: out.month!,
    day: out.day!,
    // Some engines print midnight as 24 with h23; treat it as 0.
    hour: out.hour! % 24,
    minute: out.minute!,
    second: out.second!,
  };
}

/** Offset of local time from UTC at `ts`, in ms (positive east of Greenwich). */
export function utcOffsetMs(ts: number, timeZone: string): number {
  const p = localParts(ts, timeZone);
  const asUtc = Date.UTC(p.year, p.month - 1, p.day, p.hour, p.minute, p.second);
  return asUtc - Math.floor(ts / 1000) * 1000;
}

/** "UTC+01:00" */
export function utcOffsetLabel(ts: number, timeZone: string): string {
  const min = Math.round(utcOffsetMs(ts, timeZone) / 60_000);
  const sign = min < 0 ? "−" : "+";
  const a = Math.abs(min);
  return `UTC${sign}${pad2(Math.floor(a / 60))}:${pad2(a % 60)}`;
}

const dayKey = (y: number, m: number, d: number) => Date.UTC(y, m - 1, d);

/**
 * UTC ms of the first instant of local date y-m-d in `timeZone`: local midnight, or, where a zone skips midnight
 * for a daylight-saving change, the first wall-clock time that exists that day.
 */
export function startOfLocalDay(year: number, month: number, day: number, timeZone: string): number {
  const target = dayKey(year, month, day);
  // Local midnight read as if it were UTC, corrected by the offset found there; twice covers a change in between.
  let t = target - utcOffsetMs(target, timeZone);
  t = target - utcOffsetMs(t, timeZone);
  const onDay = (ts: number) => {
    const p = localParts(ts, timeZone);
    return dayKey(p.year, p.month, p.day);
  };
  if (onDay(t) === target && onDay(t - 1) < target) return t;
  // Midnight does not exist (or the guess fell off the day): the first instant whose local date is the target day,
  // by bisection over a window that surely contains it.
  let lo = target - 2 * DAY_MS;
  let hi = target + 2 * DAY_MS;
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (onDay(mid) >= target) hi = mid;
    else lo = mid;
  }
  return hi;
}

/** The month that contains `ts` in `timeZone`. */
export function monthOf(ts: number, timeZone: string): Month {
  const p = localParts(ts, timeZone);
  return formatMonth(p.year, p.month);
}

/** "yyyy-mm-dd" of `ts` in `timeZone`. */
export function localDate(ts: number, timeZone: string): string {
  const p = localParts(ts, timeZone);
  return `${p.year}-${pad2(p.month)}-${pad2(p.day)}`;
}

/** "yyyy-mm-dd HH:mm" of `ts` in `timeZone`. */
export function localDateTime(ts: number, timeZone: string): string {
  const p = localParts(ts, timeZone);
  return `${p.year}-${pad2(p.month)}-${pad2(p.day)} ${pad2(p.hour)}:${pad2(p.minute)}`;
}

const fullWindows = new Map<string, MonthWindow>();

function fullMonthWindow(month: Month, timeZone: string): MonthWindow {
  const key = `${month}|${timeZone}`;
  const hit = fullWindows.get(key);
  if (hit) return hit;
  const { year, month: m } = parseMonth(month);
  const daysInMonth = new Date(Date.UTC(year, m, 0)).getUTCDate();
  const starts: number[] = [];
  for (let d = 1; d <= daysInMonth; d++) starts.push(startOfLocalDay(year, m, d, timeZone));
  const next = parseMonth(shiftMonth(month, 1));
  const monthEnd = startOfLocalDay(next.year, next.month, 1, timeZone);
  const from = starts[0]!;
  const w: MonthWindow = {
    month,
    timeZone,
    from,
    to: monthEnd,
    monthEnd,
    partial: false,
    hours: (monthEnd - from) / HOUR_MS,
    nominalHours: daysInMonth * 24,
    days: starts.map((dFrom, i) => ({ date: `${year}-${pad2(m)}-${pad2(i + 1)}`, from: dFrom, to: starts[i + 1] ?? monthEnd })),
    offsetAtStart: utcOffsetLabel(from, timeZone),
    offsetAtEnd: utcOffsetLabel(monthEnd - 1, timeZone),
  };
  // Windows are pure functions of (month, zone); a few hundred cover every report anyone asks for.
  if (fullWindows.size > 2000) fullWindows.clear();
  fullWindows.set(key, w);
  return w;
}

/** The month's window in `timeZone`; with `now` inside the month, it is cut there (month to date). */
export function monthWindow(month: Month, timeZone: string, now?: number): MonthWindow {
  const w = fullMonthWindow(month, timeZone);
  if (now === undefined || now >= w.monthEnd) return { ...w, days: w.days.map((d) => ({ ...d })) };
  const to = Math.max(w.from, now);
  return {
    ...w,
    to,
    partial: true,
    days: w.days.filter((d) => d.from < to).map((d) => ({ ...d, to: Math.min(d.to, to) })),
  };
}

/** A sentence for the report when the month is not days × 24 hours long; null otherwise. */
export function monthLengthNote(w: Pick<MonthWindow, "hours" | "nominalHours" | "timeZone" | "offsetAtStart" | "offsetAtEnd">): string | null {
  if (w.hours === w.nominalHours) return null;
  const diff = w.hours - w.nominalHours;
  const change = diff < 0 ? "clocks went forward" : "clocks went back";
  return `${w.hours} h, not ${w.nominalHours} h: in ${w.timeZone} the ${change} this month (${w.offsetAtStart} → ${w.offsetAtEnd}).`;
}

/** The last whole month at `now` in `timeZone` (what a monthly report shows by default). */
export function previousMonth(now: number, timeZone: string): Month {
  return shiftMonth(monthOf(now, timeZone), -1);
}

/** False for a month that has not begun anywhere on Earth yet (UTC+14 is the earliest local time). */
export function monthHasBegun(month: Month, now: number): boolean {
  const { year, month: m } = parseMonth(month);
  return Date.UTC(year, m - 1, 1) - 14 * HOUR_MS <= now;
}
