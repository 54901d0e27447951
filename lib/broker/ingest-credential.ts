import { randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { databasePath } from "@/db/client";
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

/**
 * The ingester's MQTT password: MQTT_INGEST_PASSWORD when set, otherwise a random one kept beside the
 * database (created on first use, readable by the owner only) so the broker and the ingester agree.
 */
export function ingestPassword(dbFile = databasePath(), env: Record<string, string | undefined> = process.env): string {
  const fromEnv = env.MQTT_INGEST_PASSWORD;
  if (fromEnv) return fromEnv;
  const file = ingestSecretPath(dbFile);
  fs.mkdirSync(path.dirname(file), { recursive: true });
  if (!fs.existsSync(file)) {
    // Written aside and linked into place, so a process starting at the same moment never reads half a file.
    const tmp = `${file}.${process.pid}.${randomBytes(4).toString("hex")}`;
    fs.writeFileSync(tmp, `${randomBytes(24).toString("base64url")}\n`, { mode: 0o600 });
    try {
      fs.linkSync(tmp, file);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== "EEXIST") throw e;
    } finally {
      fs.rmSync(tmp, { force: true });
    }
  }
  const secret = fs.readFileSync(file, "utf8").trim();
  if (secret.length < 16) throw new Error(`${file} holds no usable secret`);
  return secret;
}
