import type { Priority } from "@/shared/alarm-rules";
import type { Db } from "./client";
import { events } from "./schema";

export type NewEvent = {
  ts?: number;
  kind: string;
  action: string;
  text: string;
  priority?: Priority | null;
  siteId?: number | null;
  compressorId?: number | null;
  alarmId?: number | null;
  actor?: string;
  details?: Record<string, unknown> | null;
};

/** Appends one entry to the searchable event log (the FTS index follows by trigger). */
export function appendEvent(db: Db, e: NewEvent): number {
  return db
    .insert(events)
    .values({
      ts: e.ts ?? Date.now(),
      kind: e.kind,
      action: e.action,
      text: e.text,
      priority: e.priority ?? null,
      siteId: e.siteId ?? null,
      compressorId: e.compressorId ?? null,
      alarmId: e.alarmId ?? null,
      actor: e.actor ?? "",
      details: e.details ?? null,
    })
    .returning({ id: events.id })
    .get().id;
}
