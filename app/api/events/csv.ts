import type { EventDto } from "@/db/event-search";
import { isoWithOffset } from "@/components/events/zoned-time";

// CSV as RFC 4180 (Shafranovich, "Common Format and MIME Type for Comma-Separated Values (CSV) Files", IETF 2005):
// records end in CRLF; a field holding a comma, a double quote, CR or LF is enclosed in double quotes, and a double
// quote inside it is written twice. The first record is the header.
//
// Spreadsheets execute a cell that starts with = + - @ (or a tab or CR) as a formula; such text fields are written
// with a leading apostrophe, as commonly recommended against CSV injection. Numbers and times never start that way.

export function csvField(value: string | number | null | undefined): string {
  if (value === null || value === undefined) return "";
  const s = String(value);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** A text field a person or a device wrote: neutralised against formula execution, then quoted as needed. */
export function csvText(value: string | null | undefined): string {
  if (!value) return "";
  return csvField(/^[=+\-@\t\r]/.test(value) ? `'${value}` : value);
}

export function csvRecord(fields: readonly string[]): string {
  return `${fields.join(",")}\r\n`;
}

export const eventCsvHeader = csvRecord(
  ["time", "time_zone", "site", "compressor", "priority", "kind", "action", "actor", "text", "event_id", "compressor_id", "alarm_id"].map(csvField),
);

/** One event; its time in ISO 8601 with the offset of its site's zone (`fallbackZone` for events of no site). */
export function eventCsvRecord(e: EventDto, fallbackZone: string): string {
  const zone = e.timeZone ?? fallbackZone;
  return csvRecord([
    csvField(isoWithOffset(e.ts, zone)),
    csvField(zone),
    csvText(e.siteName),
    csvText(e.compressorName),
    csvField(e.priority),
    csvField(e.kind),
    csvField(e.action),
    csvText(e.actor),
    csvText(e.text),
    csvField(e.id),
    csvField(e.compressorId),
    csvField(e.alarmId),
  ]);
}
