import { z } from "zod";
import { runStateSchema } from "./telemetry";

/** What the live WebSocket sends about one compressor: its last reading and connection state. */
export const liveCompressorSchema = z.object({
  compressorId: z.number().int(),
  online: z.boolean(),
  /** Server time the last reading arrived, ms; null when none has arrived. */
  receivedAt: z.number().nullable(),
  /** Device time of the last reading, ms. */
  ts: z.number().nullable(),
  runState: runStateSchema.nullable(),
  motorOn: z.boolean().nullable(),
  deliveryBar: z.number().nullable(),
  stageBar: z.array(z.number().nullable()),
  stageC: z.array(z.number().nullable()),
  oilBar: z.number().nullable(),
  purifierC: z.number().nullable(),
  intakeC: z.number().nullable(),
  hourMeterH: z.number().nullable(),
  starts: z.number().nullable(),
  tripCode: z.number().nullable(),
  /** Pressure slope over the recent fill, bar per minute; null when not filling or unknown. */
  fillRateBarPerMin: z.number().nullable(),
});
export type LiveCompressor = z.infer<typeof liveCompressorSchema>;

export const liveMessageSchema = z.discriminatedUnion("type", [
  z.object({ type: z.literal("snapshot"), at: z.number(), compressors: z.array(liveCompressorSchema) }),
  z.object({ type: z.literal("update"), at: z.number(), compressor: liveCompressorSchema }),
  z.object({ type: z.literal("ping"), at: z.number() }),
]);
export type LiveMessage = z.infer<typeof liveMessageSchema>;

/** A reading older than this is shown as stale, not as a live value. */
export const STALE_AFTER_MS = 30_000;
