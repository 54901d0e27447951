// Who is on call at a site at a given instant. Rota times are local wall-clock times in the site's IANA time zone;
// the offsets come from the tz database through Intl (ICU's copy of it), never from a fixed UTC offset.
//
// A shift's start and end are turned into instants on the day they fall on, so the answer is right on the days the
// clocks change:
//  - a wall time that does not exist (spring forward, e.g. 02:30 in Europe/Oslo on the last Sunday of March) is read
//    with the offset in force before the gap, i.e. it lands just after the gap (02:30 → 03:30 CEST);
//  - a wall time that happens twice (fall back, 02:30 twice in Europe/Oslo on the last Sunday of October) means the
//    first occurrence.
// That is RFC 5545 §3.3.5's reading of local times and TC39 Temporal's "compatible" disambiguation. A shift
// "00:00–08:00" is therefore 7 hours long on the spring-forward day and 9 hours on the fall-back day, as it is on the wall.

export const weekdayNames = ["Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"] as const;
export const weekdayShort = ["Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"] as const;

export type RotaEntry = {
  id: number;
  contactId: number;
  position: number;
  /** ISO weekdays the shift starts on: 1 = Monday … 7 = Sunday. */
  weekdays: readonly number[];
  /** "HH:MM" local. */
  startTime: string;
  /** "HH:MM" local; at or before the start means the shift ends on the next day ("08:00"–"08:00" is 24 hours). */
  endTime: string;
};

const TIME_RE = /^([01]\d|2[0-3]):([0-5]\d)$/;

/** "HH:MM" → minutes after midnight, or null. */
export function parseClock(time: string): number | null {
  const m = TIME_RE.exec(time);
  return m ? Number(m[1]) * 60 + Number(m[2]) : null;
}

export type LocalParts = { year: number; month: number; day: number; hour: number; minute: number; second: number; weekday: number };

const formatters = new Map<string, Intl.DateTimeFormat>();
function formatter(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat("en-US", {
      timeZone,
      hourCycle: "h23",
      year: "numeric",
      month: "numeric",
      day: "numeric",
      hour: "numeric",
      minute: "numeric",
      second: "numeric",
      weekday: "short",
    });
    formatters.set(timeZone, f);
  }
  return f;
}

const weekdayIndex: Record<string, number> = { Mon: 1, Tue: 2, Wed: 3, Thu: 4, Fri: 5, Sat: 6, Sun: 7 };

/** The wall-clock date and time at `ms` in `timeZone`. */
export function localParts(ms: number, timeZone: string): LocalParts {
  const parts: Record<string, string> = {};
  for (const p of formatter(timeZone).formatToParts(new Date(ms))) parts[p.type] = p.value;
  return {
    year: Number(parts.year),
    month: Number(parts.month),
    day: Number(parts.day),
    hour: Number(parts.hour) % 24,
    minute: Number(parts.minute),
    second: Number(parts.second),
    weekday: weekdayIndex[parts.weekday ?? ""] ?? 0,
  };
}

/** Offset of local time from UTC at the instant `ms`, in ms (e.g. +3 600 000 for CET). */
export function offsetAt(ms: number, timeZone: string): number {
  const p = localParts(ms, timeZone);
  const asUtc = Date.UTC(p.year, p.month - 1, p.day, p.hour, p.minute, p.second);
  return asUtc - Math.floor(ms / 1000) * 1000;
}

/** A calendar date without a time zone (month 1–12); day may overflow, Date.UTC normalises it. */
export type CivilDate = { year: number; month: number; day: number };

function normalise(d: CivilDate): CivilDate {
  const t = new Date(Date.UTC(d.year, d.month - 1, d.day));
  return { year: t.getUTCFullYear(), month: t.getUTCMonth() + 1, day: t.getUTCDate() };
}

/** ISO weekday (1 = Monday) of a calendar date. */
export function isoWeekday(d: CivilDate): number {
  const w = new Date(Date.UTC(d.year, d.month - 1, d.day)).getUTCDay();
  return w === 0 ? 7 : w;
}

/** The instant a local wall time on a date happens in `timeZone` ("compatible" reading of gaps and repeats, see above). */
export function zonedInstant(date: CivilDate, minuteOfDay: number, timeZone: string): number {
  const d = normalise(date);
  const wall = Date.UTC(d.year, d.month - 1, d.day, Math.floor(minuteOfDay / 60), minuteOfDay % 60);
  // The offsets a day either side cover any single transition near this wall time.
  const before = offsetAt(wall - 86_400_000, timeZone);
  const after = offsetAt(wall + 86_400_000, timeZone);
  const candidates = [...new Set([wall - before, wall - after])]
    .filter((t) => t + offsetAt(t, timeZone) === wall)
    .sort((a, b) => a - b);
  if (candidates.length) return candidates[0]!; // repeated wall time: the first occurrence
  return wall - before; // skipped wall time: the offset before the gap, which lands after it
}

/** The local calendar date at `ms` in `timeZone`. */
export function localDate(ms: number, timeZone: string): CivilDate {
  const p = localParts(ms, timeZone);
  return { year: p.year, month: p.month, day: p.day };
}

export type Shift = { start: number; end: number };

/** The instants of the shift of `entry` that starts on local date `date`, or null if it does not run that day. */
export function shiftOn(entry: Pick<RotaEntry, "weekdays" | "startTime" | "endTime">, date: CivilDate, timeZone: string): Shift | null {
  const start = parseClock(entry.startTime);
  const end = parseClock(entry.endTime);
  if (start === null || end === null) return null;
  if (!entry.weekdays.includes(isoWeekday(date))) return null;
  const endDate = end > start ? date : { ...date, day: date.day + 1 };
  return { start: zonedInstant(date, start, timeZone), end: zonedInstant(endDate, end, timeZone) };
}

/** The shift of `entry` that covers `at`, if any (shifts last at most 24 hours, so yesterday's and today's suffice). */
export function coveringShift(entry: Pick<RotaEntry, "weekdays" | "startTime" | "endTime">, at: number, timeZone: string): Shift | null {
  const today = localDate(at, timeZone);
  for (const date of [{ ...today, day: today.day - 1 }, today]) {
    const shift = shiftOn(entry, date, timeZone);
    if (shift && shift.start <= at && at < shift.end) return shift;
  }
  return null;
}

/** The entries on call at `at`, in rota order (position, then id). */
export function onCallAt<E extends RotaEntry>(entries: readonly E[], at: number, timeZone: string): E[] {
  return entries
    .filter((e) => coveringShift(e, at, timeZone) !== null)
    .sort((a, b) => a.position - b.position || a.id - b.id);
}

/** "Mon–Fri 08:00–20:00", "Sat, Sun 20:00–08:00 (next day)". */
export function describeShift(entry: Pick<RotaEntry, "weekdays" | "startTime" | "endTime">): string {
  const days = [...new Set(entry.weekdays)].filter((d) => d >= 1 && d <= 7).sort((a, b) => a - b);
  let dayText: string;
  if (days.length === 7) dayText = "Every day";
  else {
    const runs: string[] = [];
    for (let i = 0; i < days.length; ) {
      let j = i;
      while (j + 1 < days.length && days[j + 1] === days[j]! + 1) j++;
      const a = weekdayShort[days[i]! - 1]!;
      const b = weekdayShort[days[j]! - 1]!;
      runs.push(j - i >= 2 ? `${a}–${b}` : j > i ? `${a}, ${b}` : a);
      i = j + 1;
    }
    dayText = runs.join(", ");
  }
  const start = parseClock(entry.startTime);
  const end = parseClock(entry.endTime);
  const overnight = start !== null && end !== null && end <= start;
  return `${dayText} ${entry.startTime}–${entry.endTime}${overnight ? " (next day)" : ""}`;
}
