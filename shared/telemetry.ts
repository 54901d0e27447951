import { z } from "zod";

/** Version 1 of the message contract between a compressor gateway and Airkeep. */
export const TELEMETRY_VERSION = 1;
export const TOPIC_ROOT = "airkeep/v1";
export const MAX_PAYLOAD_BYTES = 4096;
export const MAX_STAGES = 4;

export const runStates = ["stopped", "standby", "starting", "running", "tripped"] as const;
export const runStateSchema = z.enum(runStates);
export type RunState = z.infer<typeof runStateSchema>;
/** Integer codes stored in the readings table. */
export const runStateCode: Record<RunState, number> = { stopped: 0, standby: 1, starting: 2, running: 3, tripped: 4 };
export const runStateFromCode = (code: number): RunState => runStates[code] ?? "stopped";

const idPart = z.string().regex(/^[a-z0-9][a-z0-9-]{0,62}$/, "lower-case letters, digits and hyphens");
export const deviceIdSchema = idPart;
export const siteCodeSchema = idPart;

const finiteIn = (min: number, max: number) => z.number().finite().min(min).max(max);
/** Pressures have no ceiling here: what a compressor can reach depends on its model, judged by the ingester. */
const pressureBar = () => z.number().finite().min(-1);
const optionalIn = (min: number, max: number) => finiteIn(min, max).nullable().optional();

export const telemetrySchema = z.strictObject({
  v: z.literal(TELEMETRY_VERSION),
  seq: z.number().int().min(0).max(Number.MAX_SAFE_INTEGER),
  /** Device clock, milliseconds since the epoch (UTC). */
  ts: z.number().int().positive(),
  runState: runStateSchema,
  motorOn: z.boolean(),
  /** Delivery (final) pressure, bar gauge. */
  deliveryBar: pressureBar(),
  /** Pressure after each stage where fitted, bar gauge; index 0 is stage 1. */
  stageBar: z.array(pressureBar().nullable()).max(MAX_STAGES).optional(),
  /** Outlet temperature of each stage, °C. */
  stageC: z.array(finiteIn(-50, 350).nullable()).max(MAX_STAGES).optional(),
  oilBar: optionalIn(-1, 30),
  purifierC: optionalIn(-50, 150),
  intakeC: optionalIn(-50, 80),
  hourMeterH: finiteIn(0, 1_000_000),
  starts: z.number().int().min(0).max(1_000_000_000),
  tripCode: z.number().int().min(0).max(65_535).nullable().optional(),
});
export type Telemetry = z.infer<typeof telemetrySchema>;

export const statusSchema = z.strictObject({
  v: z.literal(TELEMETRY_VERSION),
  status: z.enum(["online", "offline"]),
  ts: z.number().int().positive().optional(),
});
export type DeviceStatus = z.infer<typeof statusSchema>;

export const deviceEventSchema = z.strictObject({
  v: z.literal(TELEMETRY_VERSION),
  seq: z.number().int().min(0).max(Number.MAX_SAFE_INTEGER),
  ts: z.number().int().positive(),
  kind: z.enum(["state", "trip"]),
  runState: runStateSchema,
  tripCode: z.number().int().min(0).max(65_535).nullable().optional(),
  text: z.string().max(200).optional(),
});
export type DeviceEvent = z.infer<typeof deviceEventSchema>;

export const channels = ["telemetry", "status", "event"] as const;
export type Channel = (typeof channels)[number];

export function topicFor(siteCode: string, deviceId: string, channel: Channel): string {
  return `${TOPIC_ROOT}/${siteCode}/${deviceId}/${channel}`;
}

/** Subscription that covers every device's channels. */
export const INGEST_SUBSCRIPTION = `${TOPIC_ROOT}/+/+/+`;

export type ParsedTopic = { siteCode: string; deviceId: string; channel: Channel };

export function parseTopic(topic: string): ParsedTopic | null {
  const parts = topic.split("/");
  if (parts.length !== 5 || `${parts[0]}/${parts[1]}` !== TOPIC_ROOT) return null;
  const [, , siteCode, deviceId, channel] = parts as [string, string, string, string, string];
  if (!siteCodeSchema.safeParse(siteCode).success || !deviceIdSchema.safeParse(deviceId).success) return null;
  if (!(channels as readonly string[]).includes(channel)) return null;
  return { siteCode, deviceId, channel: channel as Channel };
}

/** One stored reading, in the units and shape of the readings table. */
export type ReadingInput = {
  compressorId: number;
  ts: number;
  seq: number;
  deliveryBar: number | null;
  stage1Bar: number | null;
  stage2Bar: number | null;
  stage3Bar: number | null;
  stage4Bar: number | null;
  stage1C: number | null;
  stage2C: number | null;
  stage3C: number | null;
  stage4C: number | null;
  oilBar: number | null;
  purifierC: number | null;
  intakeC: number | null;
  runState: number;
  motorOn: number;
  hourMeterH: number | null;
  starts: number | null;
  tripCode: number | null;
  /** Pressures withheld as beyond the model's reach (a sensor fault), by field name; see lib/ingester/plausibility.ts. */
  implausible?: Record<string, number> | null;
};

export function telemetryToReading(compressorId: number, t: Telemetry): ReadingInput {
  const sb = t.stageBar ?? [];
  const sc = t.stageC ?? [];
  return {
    compressorId,
    ts: t.ts,
    seq: t.seq,
    deliveryBar: t.deliveryBar,
    stage1Bar: sb[0] ?? null,
    stage2Bar: sb[1] ?? null,
    stage3Bar: sb[2] ?? null,
    stage4Bar: sb[3] ?? null,
    stage1C: sc[0] ?? null,
    stage2C: sc[1] ?? null,
    stage3C: sc[2] ?? null,
    stage4C: sc[3] ?? null,
    oilBar: t.oilBar ?? null,
    purifierC: t.purifierC ?? null,
    intakeC: t.intakeC ?? null,
    runState: runStateCode[t.runState],
    motorOn: t.motorOn ? 1 : 0,
    hourMeterH: t.hourMeterH,
    starts: t.starts,
    tripCode: t.tripCode ?? null,
  };
}
