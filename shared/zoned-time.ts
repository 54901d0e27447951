// Wall-clock time in an IANA zone, both ways, without a date library: Intl gives the zone's fields for an instant,
// and a local time is turned into an instant by correcting a first guess with the zone's offset (twice, so that
// the answer is right on either side of a daylight-saving change). Times are stored as UTC milliseconds.

type Fields = { year: number; month: number; day: number; hour: number; minute: number; second: number };

const formats = new Map<string, Intl.DateTimeFormat>();

function format(timeZone: string): Intl.DateTimeFormat {
  let f = formats.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat("en-CA", {
      timeZone,
      year: "numeric",
      month: "2-digit",
      day: "2-digit",
      hour: "2-digit",
      minute: "2-digit",
      second: "2-digit",
      hourCycle: "h23",
    });
    formats.set(timeZone, f);
  }
  return f;
}

function fields(ms: number, timeZone: string): Fields {
  const out: Record<string, number> = {};
  for (const p of format(timeZone).formatToParts(ms)) if (p.type !== "literal") out[p.type] = Number(p.value);
  return { year: out.year!, month: out.month!, day: out.day!, hour: out.hour! % 24, minute: out.minute!, second: out.second! };
}

/** The zone's offset from UTC at that instant, in minutes (east positive: Europe/Oslo in summer is +120). */
export function offsetMinutes(ms: number, timeZone: string): number {
  const whole = Math.floor(ms / 1000) * 1000;
  const f = fields(whole, timeZone);
  return Math.round((Date.UTC(f.year, f.month - 1, f.day, f.hour, f.minute, f.second) - whole) / 60_000);
}

const pad = (n: number, w = 2) => String(Math.abs(n)).padStart(w, "0");

const LOCAL = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2}))?$/;

/**
 * "2025-03-30T02:30" in `timeZone` → UTC ms; null when it is not a valid local time. A time that the clocks skip
 * (spring forward) is read with the offset before the change, i.e. an hour later on the wall clock.
 */
export function zonedLocalToUtc(local: string, timeZone: string): number | null {
  const m = LOCAL.exec(local.trim());
  if (!m) return null;
  const [y, mo, d, h, mi, s] = m.slice(1).map((x) => (x === undefined ? 0 : Number(x))) as [number, number, number, number, number, number];
  if (mo < 1 || mo > 12 || d < 1 || d > 31 || h > 23 || mi > 59 || s > 59) return null;
  const guess = Date.UTC(y, mo - 1, d, h, mi, s);
  if (new Date(guess).getUTCDate() !== d) return null;
  const first = guess - offsetMinutes(guess, timeZone) * 60_000;
  const offset = offsetMinutes(first, timeZone);
  const second = guess - offset * 60_000;
  if (offsetMinutes(second, timeZone) === offset) return second;
  // In the gap of a spring-forward change: use the offset in force before it.
  return guess - offsetMinutes(Math.min(first, second), timeZone) * 60_000;
}

/** UTC ms → "2025-03-14T14:05" in the zone (the value of a datetime-local input). */
export function utcToZonedLocal(ms: number, timeZone: string): string {
  const f = fields(ms, timeZone);
  return `${pad(f.year, 4)}-${pad(f.month)}-${pad(f.day)}T${pad(f.hour)}:${pad(f.minute)}`;
}

/** UTC ms → "2025-03-14 14:05:09" in the zone. */
export function formatZoned(ms: number, timeZone: string): string {
  const f = fields(ms, timeZone);
  return `${pad(f.year, 4)}-${pad(f.month)}-${pad(f.day)} ${pad(f.hour)}:${pad(f.minute)}:${pad(f.second)}`;
}

/** UTC ms → ISO 8601 with the zone's offset, "2025-03-14T14:05:09.120+01:00" (RFC 3339 profile). */
export function isoWithOffset(ms: number, timeZone: string): string {
  const f = fields(ms, timeZone);
  const off = offsetMinutes(ms, timeZone);
  const millis = pad(((ms % 1000) + 1000) % 1000, 3);
  const sign = off < 0 ? "-" : "+";
  return `${pad(f.year, 4)}-${pad(f.month)}-${pad(f.day)}T${pad(f.hour)}:${pad(f.minute)}:${pad(f.second)}.${millis}${sign}${pad(Math.trunc(off / 60))}:${pad(off % 60)}`;
}

/** "UTC+01:00" — the offset at that instant, unambiguous where abbreviations are not. */
export function offsetLabel(ms: number, timeZone: string): string {
  const off = offsetMinutes(ms, timeZone);
  return `UTC${off < 0 ? "-" : "+"}${pad(Math.trunc(off / 60))}:${pad(off % 60)}`;
}
