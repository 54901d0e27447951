import {
  type DeviceEvent,
  deviceEventSchema,
  type DeviceStatus,
  MAX_PAYLOAD_BYTES,
  type ParsedTopic,
  parseTopic,
  statusSchema,
  type Telemetry,
  telemetrySchema,
} from "@/shared/telemetry";
import type { DirectoryEntry } from "./device-directory";
import { isTelemetryFast } from "./fast-telemetry";
import { type SequenceRejectReason, sequenceRejectReasons } from "./sequence";

export const rejectReasons = [
  "oversized",
  "badJson",
  "schema",
  "unknownTopic",
  "unknownDevice",
  "future",
  "tooOld",
  "duplicate",
  ...sequenceRejectReasons,
] as const;
export type RejectReason = (typeof rejectReasons)[number];

export type TimeLimits = {
  /** Device time may run ahead of server time by at most this. */
  maxFutureMs: number;
  /** Readings older than this (device time) are refused. */
  maxAgeMs: number;
};

export const DEFAULT_TIME_LIMITS: TimeLimits = { maxFutureMs: 5 * 60_000, maxAgeMs: 7 * 86_400_000 };

export type Classified =
  | { ok: true; channel: "telemetry"; device: DirectoryEntry; msg: Telemetry }
  | { ok: true; channel: "status"; device: DirectoryEntry; msg: DeviceStatus }
  | { ok: true; channel: "event"; device: DirectoryEntry; msg: DeviceEvent }
  | { ok: false; reason: Exclude<RejectReason, "duplicate" | SequenceRejectReason>; detail: string; deviceId?: string };

function firstIssue(error: { issues: { path: PropertyKey[]; message: string }[] }): string {
  const i = error.issues[0];
  return i ? `${i.path.map(String).join(".") || "(root)"}: ${i.message}` : "invalid";
}

const topicCache = new Map<string, ParsedTopic | null>();

function parseTopicCached(topic: string): ParsedTopic | null {
  let t = topicCache.get(topic);
  if (t === undefined) {
    t = parseTopic(topic);
    // Bounded: a flood of distinct junk topics just empties it now and then.
    if (topicCache.size >= 50_000) topicCache.clear();
    topicCache.set(topic, t);
  }
  return t;
}

/** Checks one MQTT message against the contract in shared/telemetry.ts; cheapest checks first. */
export function classifyMessage(
  topic: string,
  payload: Uint8Array,
  now: number,
  lookup: (deviceId: string) => DirectoryEntry | undefined,
  limits: TimeLimits = DEFAULT_TIME_LIMITS,
): Classified {
  if (payload.byteLength > MAX_PAYLOAD_BYTES) {
    return { ok: false, reason: "oversized", detail: `${payload.byteLength} bytes` };
  }
  const t = parseTopicCached(topic);
  if (!t) return { ok: false, reason: "unknownTopic", detail: topic.slice(0, 120) };
  const device = lookup(t.deviceId);
  if (!device) return { ok: false, reason: "unknownDevice", detail: `no compressor with device id ${t.deviceId}`, deviceId: t.deviceId };
  if (device.siteCode !== t.siteCode) {
    return { ok: false, reason: "unknownDevice", detail: `${t.deviceId} is not at site ${t.siteCode}`, deviceId: t.deviceId };
  }
  let json: unknown;
  try {
    json = JSON.parse(Buffer.from(payload.buffer, payload.byteOffset, payload.byteLength).toString("utf8"));
  } catch (e) {
    return { ok: false, reason: "badJson", detail: (e as Error).message.slice(0, 120), deviceId: t.deviceId };
  }
  const checkTime = (ts: number): Classified | null => {
    if (ts > now + limits.maxFutureMs) {
      return { ok: false, reason: "future", detail: `ts ${ts} is ${Math.round((ts - now) / 1000)} s ahead`, deviceId: t.deviceId };
    }
    if (ts < now - limits.maxAgeMs) {
      return { ok: false, reason: "tooOld", detail: `ts ${ts} is ${Math.round((now - ts) / 1000)} s old`, deviceId: t.deviceId };
    }
    return null;
  };
  switch (t.channel) {
    case "telemetry": {
      if (isTelemetryFast(json)) return checkTime(json.ts) ?? { ok: true, channel: "telemetry", device, msg: json };
      const r = telemetrySchema.safeParse(json);
      if (!r.success) return { ok: false, reason: "schema", detail: firstIssue(r.error), deviceId: t.deviceId };
      return checkTime(r.data.ts) ?? { ok: true, channel: "telemetry", device, msg: r.data };
    }
    case "event": {
      const r = deviceEventSchema.safeParse(json);
      if (!r.success) return { ok: false, reason: "schema", detail: firstIssue(r.error), deviceId: t.deviceId };
      return checkTime(r.data.ts) ?? { ok: true, channel: "event", device, msg: r.data };
    }
    case "status": {
      // A last-will payload is fixed when the device connects, so its ts may be old: no time window here.
      const r = statusSchema.safeParse(json);
      if (!r.success) return { ok: false, reason: "schema", detail: firstIssue(r.error), deviceId: t.deviceId };
      return { ok: true, channel: "status", device, msg: r.data };
    }
  }
}
