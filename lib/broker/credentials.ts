import { createHash, timingSafeEqual } from "node:crypto";
import type { Statement } from "better-sqlite3";
import bcrypt from "bcryptjs";
import type { Db } from "@/db/client";
import { TOPIC_ROOT } from "@/shared/telemetry";
import { INGEST_USERNAME } from "./ingest-credential";

export type DeviceIdentity = {
  kind: "device";
  compressorId: number;
  deviceId: string;
  siteId: number;
  siteCode: string;
  /** The hash the password was checked against; a change means the credential was reissued or revoked. */
  secretHash: string;
  /** `airkeep/v1/<site>/<device>/` */
  topicPrefix: string;
};
export type IngesterIdentity = { kind: "ingester" };
export type Identity = DeviceIdentity | IngesterIdentity;

export type CredentialFailure = "missing_credentials" | "unknown_device" | "no_credential_issued" | "bad_password";
export type CredentialResult = { ok: true; identity: Identity } | { ok: false; reason: CredentialFailure };

type DeviceRow = { compressorId: number; deviceId: string; siteId: number; siteCode: string; secretHash: string | null };

export type CredentialChecker = {
  check(username: string | undefined, password: Buffer | undefined): Promise<CredentialResult>;
  /** The device's current row, to notice a reissued credential or a move to another site. */
  lookup(deviceId: string): DeviceRow | null;
  readonly bcryptChecks: number;
  readonly cacheHits: number;
};

const sha256 = (b: Buffer | string) => createHash("sha256").update(b).digest();

/**
 * Checks device passwords against compressors.device_secret_hash (bcrypt). Verified outcomes are cached for a
 * short while, keyed by the stored hash, so a reconnect storm costs one bcrypt per device, and a reissued
 * credential takes effect at once.
 */
export function createCredentialChecker(
  db: Db,
  opts: { ingestPassword: string; cacheTtlMs?: number; maxEntries?: number },
): CredentialChecker {
  const ttl = opts.cacheTtlMs ?? 5 * 60_000;
  const maxEntries = opts.maxEntries ?? 20_000;
  const ingestDigest = sha256(opts.ingestPassword);
  const select = db.$client.prepare(
    `SELECT c.id AS compressorId, c.device_id AS deviceId, c.site_id AS siteId, s.code AS siteCode,
            c.device_secret_hash AS secretHash
     FROM compressors c JOIN sites s ON s.id = c.site_id WHERE c.device_id = ?`,
  ) as Statement<[string], DeviceRow>;
  const cache = new Map<string, { ok: boolean; expires: number }>();
  const pending = new Map<string, Promise<boolean>>();
  let bcryptChecks = 0;
  let cacheHits = 0;

  const remember = (key: string, ok: boolean) => {
    if (cache.size >= maxEntries) {
      const oldest = cache.keys().next().value;
      if (oldest !== undefined) cache.delete(oldest);
    }
    cache.set(key, { ok, expires: Date.now() + ttl });
  };

  async function verify(password: Buffer, hash: string): Promise<boolean> {
    const key = `${hash}\u0000${sha256(password).toString("base64")}`;
    const hit = cache.get(key);
    if (hit && hit.expires > Date.now()) {
      cacheHits++;
      return hit.ok;
    }
    let p = pending.get(key);
    if (!p) {
      bcryptChecks++;
      p = bcrypt
        .compare(password.toString("utf8"), hash)
        .catch(() => false)
        .then((ok) => {
          remember(key, ok);
          pending.delete(key);
          return ok;
        });
      pending.set(key, p);
    }
    return p;
  }

  return {
    async check(username, password) {
      if (!username || !password || password.length === 0 || password.length > 512) {
        return { ok: false, reason: "missing_credentials" };
      }
      if (username === INGEST_USERNAME) {
        const ok = timingSafeEqual(sha256(password), ingestDigest);
        return ok ? { ok: true, identity: { kind: "ingester" } } : { ok: false, reason: "bad_password" };
      }
      const row = select.get(username);
      if (!row) return { ok: false, reason: "unknown_device" };
      if (!row.secretHash) return { ok: false, reason: "no_credential_issued" };
      if (!(await verify(password, row.secretHash))) return { ok: false, reason: "bad_password" };
      return {
        ok: true,
        identity: {
          kind: "device",
          compressorId: row.compressorId,
          deviceId: row.deviceId,
          siteId: row.siteId,
          siteCode: row.siteCode,
          secretHash: row.secretHash,
          topicPrefix: `${TOPIC_ROOT}/${row.siteCode}/${row.deviceId}/`,
        },
      };
    },
    lookup(deviceId) {
      return select.get(deviceId) ?? null;
    },
    get bcryptChecks() {
      return bcryptChecks;
    },
    get cacheHits() {
      return cacheHits;
    },
  };
}
