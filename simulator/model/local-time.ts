// Wall-clock time in a site's time zone. Offsets are cached per UTC hour: Intl is far too slow to call every step.

const HOUR_MS = 3_600_000;
const DAY_MS = 86_400_000;

const formatters = new Map<string, Intl.DateTimeFormat>();
const offsetCache = new Map<string, Map<number, number>>();

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
    });
    formatters.set(timeZone, f);
  }
  return f;
}

/** Offset of local time from UTC, ms, at `utcMs`; taken at the top of the UTC hour (a half-hour zone's clock change shows up to 30 min late). */
export function zoneOffsetMs(timeZone: string, utcMs: number): number {
  const hour = Math.floor(utcMs / HOUR_MS);
  let cache = offsetCache.get(timeZone);
  if (!cache) {
    cache = new Map();
    offsetCache.set(timeZone, cache);
  }
  const hit = cache.get(hour);
  if (hit !== undefined) return hit;
  const at = hour * HOUR_MS;
  const parts: Record<string, number> = {};
  for (const p of formatter(timeZone).formatToParts(at)) if (p.type !== "literal") parts[p.type] = Number(p.value);
  const asUtc = Date.UTC(parts.year!, parts.month! - 1, parts.day!, parts.hour!, parts.minute!, parts.second!);
  const offset = asUtc - at;
  if (cache.size > 50_000) cache.clear();
  cache.set(hour, offset);
  return offset;
}

export type LocalTime = {
  /** Local days since 1970-01-01: a key for the local calendar day. */
  day: number;
  /** Hours since local midnight, fractional. */
  hour: number;
  /** 0 = Sunday. */
  weekday: number;
  /** 0 = January. */
  month: number;
  /** Day of the year, 0-based. */
  dayOfYear: number;
};

export function localTime(timeZone: string, utcMs: number): LocalTime {
  const local = utcMs + zoneOffsetMs(timeZone, utcMs);
  const day = Math.floor(local / DAY_MS);
  const d = new Date(day * DAY_MS);
  return {
    day,
    hour: (local - day * DAY_MS) / HOUR_MS,
    weekday: d.getUTCDay(),
    month: d.getUTCMonth(),
    dayOfYear: Math.floor((day * DAY_MS - Date.UTC(d.getUTCFullYear(), 0, 1)) / DAY_MS),
  };
}

/** UTC instant of a local wall-clock time `hour` hours after the start of local day `day`. */
export function localToUtc(timeZone: string, day: number, hour: number): number {
  const wall = day * DAY_MS + hour * HOUR_MS;
  let utc = wall - zoneOffsetMs(timeZone, wall);
  utc = wall - zoneOffsetMs(timeZone, utc);
  return Math.round(utc);
}

const SOUTHERN =
  /^(Australia|Antarctica)\/|^Pacific\/(Auckland|Chatham|Fiji)|^America\/(Argentina|Santiago|Sao_Paulo|Montevideo|Asuncion)|^Africa\/(Johannesburg|Maputo|Windhoek)/;

/** Rough hemisphere from the zone name, enough to put the seasons the right way round. */
export function southernHemisphere(timeZone: string): boolean {
  return SOUTHERN.test(timeZone);
}

export { DAY_MS, HOUR_MS };
