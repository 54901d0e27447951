import { DAY_MS, localParts, startOfLocalDay, utcOffsetMs } from "./month";

// When a service task falls due, from the hour meter and from the calendar in the site's time zone, whichever first.
//
// - By run hours: due at (hour meter when last done) + everyHours; overdue once the meter reaches it.
// - By calendar: due on the local date everyMonths after the local date it was last done (the 31st of a shorter month
//   becomes its last day); overdue from local midnight after that date. "Done 15 Jan, every 3 months" is due by
//   15 Apr and overdue from 16 Apr 00:00 in the site's zone, whatever daylight saving did in between.
// - Coming due ("due"): within leadHours of the hour limit, or from local midnight leadDays before the calendar date.
// - Forecast: the date the hour limit will be reached at the compressor's recent run hours per day, or the calendar
//   date, whichever is earlier.

export type ServiceStatus = "overdue" | "due" | "ok";

export type DueInput = {
  everyHours: number | null;
  everyMonths: number | null;
  /** When it was last done (or the counting started), ms UTC. */
  lastAt: number;
  /** Hour meter when it was last done; null when not known (then only the calendar can be judged). */
  lastHours: number | null;
  /** Hour meter now; null when the compressor never reported one. */
  hourMeterH: number | null;
  /** Recent run hours per calendar day; null or 0 when unknown or idle. */
  hoursPerDay: number | null;
  now: number;
  timeZone: string;
  leadHours: number;
  leadDays: number;
};

export type DueResult = {
  status: ServiceStatus;
  /** Hour-meter reading at which the task is due; null for calendar-only tasks. */
  dueHours: number | null;
  /** Run hours left (negative when past). */
  hoursLeft: number | null;
  /** First instant of the overdue local day (ms UTC); null for hours-only tasks. */
  overdueAt: number | null;
  /** Local date it is due by, "yyyy-mm-dd". */
  dueDate: string | null;
  /** Expected date (ms UTC) the task falls due: the earlier of the hour forecast and the calendar; null if neither is known. */
  forecastAt: number | null;
  /** Which limit comes first. */
  firstBy: "hours" | "calendar" | null;
};

const pad2 = (n: number) => String(n).padStart(2, "0");

function daysInMonth(year: number, month: number): number {
  return new Date(Date.UTC(year, month, 0)).getUTCDate();
}

// Intl look-ups cost tens of microseconds each on a busy machine. A UTC day whose start and end have the same offset
// (every day but the few with a daylight-saving change) has that offset throughout, so it is remembered per day.
const dayOffsets = new Map<string, number | null>();
function localDateOf(ts: number, timeZone: string): { year: number; month: number; day: number } {
  const day = Math.floor(ts / DAY_MS);
  const key = `${timeZone}|${day}`;
  let off = dayOffsets.get(key);
  if (off === undefined) {
    if (dayOffsets.size > 50_000) dayOffsets.clear();
    const a = utcOffsetMs(day * DAY_MS, timeZone);
    off = a === utcOffsetMs((day + 1) * DAY_MS - 1000, timeZone) ? a : null;
    dayOffsets.set(key, off);
  }
  if (off === null) return localParts(ts, timeZone);
  const d = new Date(ts + off);
  return { year: d.getUTCFullYear(), month: d.getUTCMonth() + 1, day: d.getUTCDate() };
}

/** The local date `months` after the local date of `ts` (day clamped to the month's length). */
export function addLocalMonths(ts: number, months: number, timeZone: string): { year: number; month: number; day: number } {
  const p = localDateOf(ts, timeZone);
  const index = p.year * 12 + (p.month - 1) + months;
  const year = Math.floor(index / 12);
  const month = (index % 12) + 1;
  return { year, month, day: Math.min(p.day, daysInMonth(year, month)) };
}

// Many tasks share dates; a day's first instant is the costly part (several Intl look-ups), so it is remembered.
const dayStarts = new Map<string, number>();
function dayStart(d: { year: number; month: number; day: number }, timeZone: string): number {
  const key = `${timeZone}|${d.year}-${d.month}-${d.day}`;
  let t = dayStarts.get(key);
  if (t === undefined) {
    if (dayStarts.size > 20_000) dayStarts.clear();
    t = startOfLocalDay(d.year, d.month, d.day, timeZone);
    dayStarts.set(key, t);
  }
  return t;
}

/** Local date y-m-d shifted by n days (calendar arithmetic, no time zone involved). */
function shiftDate(d: { year: number; month: number; day: number }, n: number) {
  const t = new Date(Date.UTC(d.year, d.month - 1, d.day + n));
  return { year: t.getUTCFullYear(), month: t.getUTCMonth() + 1, day: t.getUTCDate() };
}

export function computeDue(i: DueInput): DueResult {
  let status: ServiceStatus = "ok";
  let dueHours: number | null = null;
  let hoursLeft: number | null = null;
  let hoursForecast: number | null = null;
  if (i.everyHours != null && i.everyHours > 0 && i.lastHours !== null) {
    dueHours = i.lastHours + i.everyHours;
    const meter = i.hourMeterH ?? i.lastHours;
    hoursLeft = dueHours - meter;
    if (hoursLeft <= 0) status = "overdue";
    else if (hoursLeft <= i.leadHours) status = "due";
    if (hoursLeft <= 0) hoursForecast = i.now;
    else if (i.hoursPerDay != null && i.hoursPerDay > 0) hoursForecast = i.now + (hoursLeft / i.hoursPerDay) * DAY_MS;
  }
  let overdueAt: number | null = null;
  let dueDate: string | null = null;
  let calendarDueAt: number | null = null;
  if (i.everyMonths != null && i.everyMonths > 0) {
    const d = addLocalMonths(i.lastAt, i.everyMonths, i.timeZone);
    dueDate = `${d.year}-${pad2(d.month)}-${pad2(d.day)}`;
    calendarDueAt = dayStart(d, i.timeZone);
    const after = shiftDate(d, 1);
    overdueAt = dayStart(after, i.timeZone);
    const lead = shiftDate(d, -Math.max(0, Math.round(i.leadDays)));
    const leadAt = dayStart(lead, i.timeZone);
    if (i.now >= overdueAt) status = "overdue";
    else if (i.now >= leadAt && status === "ok") status = "due";
  }
  let forecastAt: number | null = null;
  let firstBy: DueResult["firstBy"] = null;
  if (hoursForecast !== null && (calendarDueAt === null || hoursForecast <= calendarDueAt)) {
    forecastAt = hoursForecast;
    firstBy = "hours";
  } else if (calendarDueAt !== null) {
    forecastAt = calendarDueAt;
    firstBy = "calendar";
  }
  return { status, dueHours, hoursLeft, overdueAt, dueDate, forecastAt, firstBy };
}

export const statusRank: Record<ServiceStatus, number> = { overdue: 0, due: 1, ok: 2 };
