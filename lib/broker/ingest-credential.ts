import path from "node:path";
import { databasePath } from "@/db/client";
import { keptSecret } from "@/lib/kept-secret";
import { TOPIC_ROOT } from "@/shared/telemetry";

/** MQTT user name reserved for the ingester's subscribe-only credential. */
export const INGEST_USERNAME = "airkeep-ingester";
/** The ingester's client id; its persistent session is what keeps QoS 1 messages while it is away. */
export const INGEST_CLIENT_ID = "airkeep-ingester";
/** Client ids starting with this are reserved for the ingester credential (tools and benchmarks included). */
export const RESERVED_CLIENT_ID_PREFIX = "airkeep-";
/** Everything under the topic root, so malformed topics are seen and counted rather than silently missed. */
export const INGEST_TOPIC = `${TOPIC_ROOT}/#`;

export function ingestSecretPath(dbFile = databasePath()): string {
  return path.join(path.dirname(dbFile), "mqtt-ingest.secret");
}

/** The ingester's MQTT password: MQTT_INGEST_PASSWORD when set, otherwise one kept beside the database. */
export function ingestPassword(dbFile = databasePath(), env: Record<string, string | undefined> = process.env): string {
  return env.MQTT_INGEST_PASSWORD || keptSecret(path.basename(ingestSecretPath(dbFile)), dbFile);
}
