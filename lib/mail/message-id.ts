import { createHash } from "node:crypto";

/**
 * The Message-ID of an outbox row, derived from its idempotency key and the database's mail instance id.
 * A message sent again after a crash carries the same Message-ID, so a duplicate is detectable by any receiver;
 * a new database (demo reset) gets a new instance id, so "alarm 1" of one database never collides with another's.
 */
export function messageIdFor(key: string, instanceId: string, domain: string): string {
  const readable = key.replace(/[^A-Za-z0-9]+/g, ".").replace(/^\.|\.$/g, "").slice(0, 80);
  const digest = createHash("sha256").update(`${instanceId}\n${key}`).digest("hex").slice(0, 16);
  return `<${readable}.${instanceId}.${digest}@${domain}>`;
}
