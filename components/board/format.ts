import {
  pressureDecimals,
  pressureFromBar,
  pressureLabel,
  temperatureFromC,
  temperatureLabel,
  type PressureUnit,
  type TemperatureUnit,
} from "@/shared/units";

// Number and unit kept apart, so the number sits in a fixed-width box and the unit beside it.

export type Quantity = { value: string; unit: string };

export function pressureParts(bar: number | null | undefined, unit: PressureUnit, extraDecimals = 0): Quantity {
  const u = pressureLabel(unit);
  if (bar == null || !Number.isFinite(bar)) return { value: "—", unit: u };
  return { value: pressureFromBar(bar, unit).toFixed(pressureDecimals[unit] + extraDecimals), unit: u };
}

export function temperatureParts(c: number | null | undefined, unit: TemperatureUnit): Quantity {
  const u = temperatureLabel(unit);
  if (c == null || !Number.isFinite(c)) return { value: "—", unit: u };
  return { value: temperatureFromC(c, unit).toFixed(0), unit: u };
}

/** A setpoint or range end in the person's unit, without decimals that carry no information. */
export function pressureShort(bar: number, unit: PressureUnit): string {
  const v = pressureFromBar(bar, unit);
  return unit === "MPa" ? v.toFixed(1) : Math.round(v).toString();
}

export function temperatureShort(c: number, unit: TemperatureUnit): string {
  return Math.round(temperatureFromC(c, unit)).toString();
}

const timeFormats = new Map<string, Intl.DateTimeFormat>();

function timeFormat(timeZone: string, withSeconds: boolean): Intl.DateTimeFormat {
  const key = `${timeZone}|${withSeconds}`;
  let f = timeFormats.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat("en-GB", {
      timeZone,
      hour: "2-digit",
      minute: "2-digit",
      second: withSeconds ? "2-digit" : undefined,
      hourCycle: "h23",
      timeZoneName: "short",
    });
    timeFormats.set(key, f);
  }
  return f;
}

/** "14:05:09" and "GMT+1" for a site's local time. */
export function siteClock(ms: number, timeZone: string): { time: string; zone: string } {
  const parts = timeFormat(timeZone, true).formatToParts(ms);
  const zone = parts.find((p) => p.type === "timeZoneName")?.value ?? "";
  const time = parts
    .filter((p) => p.type === "hour" || p.type === "minute" || p.type === "second" || (p.type === "literal" && p.value === ":"))
    .map((p) => p.value)
    .join("");
  return { time, zone };
}

const dateTimeFormats = new Map<string, Intl.DateTimeFormat>();

/** "2025-03-14 14:05:09" in the site's time zone. */
export function siteDateTime(ms: number, timeZone: string): string {
  let f = dateTimeFormats.get(timeZone);
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
    dateTimeFormats.set(timeZone, f);
  }
  const p = Object.fromEntries(f.formatToParts(ms).map((x) => [x.type, x.value]));
  return `${p.year}-${p.month}-${p.day} ${p.hour}:${p.minute}:${p.second}`;
}
