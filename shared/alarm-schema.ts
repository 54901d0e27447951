import { z } from "zod";
import type { AlarmState } from "./alarm-lifecycle";
import type { Priority } from "./alarm-rules";

/** An alarm as the screens, e-mails and API see it. Values in stored units (bar, °C). */
export type AlarmDto = {
  id: number;
  compressorId: number;
  compressorName: string;
  siteId: number;
  siteName: string;
  timeZone: string;
  key: string;
  priority: Priority;
  signal: string | null;
  /** "Final-stage temperature high", "Trip 12: …", "Communication lost". */
  title: string;
  state: AlarmState;
  active: boolean;
  raisedAt: number;
  clearedAt: number | null;
  value: number | null;
  limitValue: number | null;
  tripCode: number | null;
  chattering: boolean;
  ackAt: number | null;
  ackByName: string | null;
  ackComment: string | null;
  shelvedUntil: number | null;
  shelveComment: string | null;
  outOfServiceReason: string | null;
};

const comment = z.string().trim().min(3, "Say what you found or did (at least 3 characters)").max(500);
const ids = z.array(z.number().int().positive()).min(1, "Choose at least one alarm").max(500);

// Acknowledging says "I have seen it": a comment helps but must not slow the on-call person down.
const optionalComment = z
  .string()
  .trim()
  .max(500)
  .refine((v) => v === "" || v.length >= 3, "A comment, if you give one, needs at least 3 characters")
  .default("");
export const acknowledgeSchema = z.object({ ids, comment: optionalComment });
export type AcknowledgeInput = z.infer<typeof acknowledgeSchema>;

/** Shelving is time-limited; the longest allowed is 24 hours unless configured otherwise. */
export const MAX_SHELVE_MINUTES = 24 * 60;
export const shelveSchema = z.object({
  ids,
  comment,
  minutes: z.coerce.number().int().min(5, "At least 5 minutes").max(MAX_SHELVE_MINUTES, `At most ${MAX_SHELVE_MINUTES / 60} hours`),
});
export type ShelveInput = z.infer<typeof shelveSchema>;

export const outOfServiceSchema = z.object({ id: z.number().int().positive(), reason: comment });
export type OutOfServiceInput = z.infer<typeof outOfServiceSchema>;

export const returnToServiceSchema = z.object({ id: z.number().int().positive(), comment });
export type ReturnToServiceInput = z.infer<typeof returnToServiceSchema>;

/** Active alarms of one compressor by priority. */
export type AlarmCounts = Record<Priority, number>;

/** GET /api/alarms */
export type AlarmsResponse = { alarms: AlarmDto[]; at: number };

/** GET /api/alarms/counts: per compressor id. */
export type AlarmCountsResponse = { counts: Record<string, AlarmCounts>; at: number };
