import { z } from "zod";
import { alarmStates } from "@/shared/alarm-lifecycle";
import { prioritySchema } from "@/shared/alarm-rules";

// Filters of the alarm list as URL parameters, for GET /api/alarms and for /alarms links (e-mails link to
// /alarms?id=<alarm> and /alarms?site=<site>).

const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);
const opt = <T extends z.ZodType>(s: T) => z.preprocess(blankToUndefined, s.optional());

export const alarmListParamsSchema = z.object({
  site: opt(z.coerce.number().int().positive()),
  compressor: opt(z.coerce.number().int().positive()),
  priority: opt(prioritySchema),
  state: opt(z.enum(alarmStates)),
});
export type AlarmListParams = z.infer<typeof alarmListParamsSchema>;

type RawParams = URLSearchParams | Record<string, string | string[] | undefined>;

function toRecord(raw: RawParams): Record<string, string | undefined> {
  if (raw instanceof URLSearchParams) return Object.fromEntries(raw.entries());
  return Object.fromEntries(Object.entries(raw).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v]));
}

export function parseAlarmListParams(raw: RawParams): AlarmListParams {
  return alarmListParamsSchema.parse(toRecord(raw));
}

/** Bad parameters dropped one by one (for a page). */
export function lenientAlarmListParams(raw: RawParams): AlarmListParams {
  const rec = toRecord(raw);
  const out: Record<string, unknown> = {};
  for (const [key, schema] of Object.entries(alarmListParamsSchema.shape)) {
    const r = (schema as z.ZodType).safeParse(rec[key]);
    if (r.success && r.data !== undefined) out[key] = r.data;
  }
  return out as AlarmListParams;
}

export function alarmListQuery(p: AlarmListParams): string {
  const sp = new URLSearchParams();
  for (const key of ["site", "compressor", "priority", "state"] as const) if (p[key] !== undefined) sp.set(key, String(p[key]));
  return sp.toString();
}
