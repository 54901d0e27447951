import type { EventDto } from "@/shared/event-schema";
import { isoWithOffset } from "@/shared/zoned-time";
import { csvField, csvRecord, csvText } from "@/shared/csv";


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
