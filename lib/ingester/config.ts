import type { Db } from "@/db/client";
import { databasePath } from "@/db/client";
import { ingestPassword } from "@/lib/broker/ingest-credential";
import { defaultAllowedOrigins } from "./live-hub";
import { ingestDefaults, type IngesterOptions } from "./ingester";

type Env = Record<string, string | undefined>;

function num(env: Env, name: string, fallback: number, min = 0): number {
  const raw = env[name];
  if (raw === undefined || raw === "") return fallback;
  const v = Number(raw);
  if (!Number.isFinite(v) || v < min) throw new Error(`${name} must be a number ≥ ${min} (got "${raw}")`);
  return v;
}

/** Ingester settings from the environment; every variable is optional. */
export function ingesterOptionsFromEnv(db: Db, env: Env = process.env): IngesterOptions {
  return {
    db,
    mqttUrl: env.MQTT_URL || "mqtt://127.0.0.1:1883",
    password: ingestPassword(databasePath(env.DATABASE_URL), env),
    protocolVersion: env.MQTT_PROTOCOL_VERSION === "5" ? 5 : 4,
    timeLimits: {
      maxFutureMs: num(env, "INGEST_MAX_FUTURE_S", 300) * 1000,
      maxAgeMs: num(env, "INGEST_MAX_AGE_S", 7 * 86_400, 1) * 1000,
    },
    flushMs: num(env, "INGEST_FLUSH_MS", ingestDefaults.flushMs, 1),
    batchRows: num(env, "INGEST_BATCH_ROWS", ingestDefaults.batchRows, 1),
    // "none" for the embedded broker, which caps nothing; otherwise a standard broker's default unless told.
    brokerInflightCap: env.MQTT_MAX_INFLIGHT === "none" ? null : num(env, "MQTT_MAX_INFLIGHT", ingestDefaults.brokerInflightCap, 1),
    commsTimeoutMs: num(env, "COMMS_TIMEOUT_S", 60, 1) * 1000,
    retentionMs: num(env, "RETENTION_DAYS", 30, 1) * 86_400_000,
    live:
      env.LIVE_PORT === "off"
        ? null
        : {
            host: env.LIVE_HOST || "127.0.0.1",
            port: num(env, "LIVE_PORT", 3001),
            allowedOrigins: defaultAllowedOrigins(env),
            maxConnectionMs: num(env, "LIVE_MAX_CONNECTION_S", 3_600, 60) * 1000,
          },
  };
}
