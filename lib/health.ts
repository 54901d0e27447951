import fs from "node:fs";
import path from "node:path";
import { getDb } from "@/db/client";
import { getBrokerStatus, getIngesterStatus, type ServiceStatus } from "@/db/telemetry-state";

const version: string = JSON.parse(fs.readFileSync(path.join(process.cwd(), "package.json"), "utf8")).version;

export type Health = {
  status: "ok" | "degraded";
  version: string;
  time: number;
  database: { ok: boolean; migrations: number; journalMode: string; error?: string };
  /** Last counters the ingester reported (connection, message rate, rejects per reason); stale after 20 s. */
  ingester: ServiceStatus | null;
  broker: ServiceStatus | null;
  /** What was turned away, by reason, side by side; each count runs from `since` (that process's start). */
  refusals: Refusals;
};

export type ReasonCounts = { since: number | null; byReason: Record<string, number> };
export type Refusals = { broker: ReasonCounts; ingester: ReasonCounts };

function byPrefix(s: ServiceStatus | null, prefix: string): ReasonCounts {
  const byReason: Record<string, number> = {};
  for (const [k, v] of Object.entries(s?.counters ?? {})) if (k.startsWith(prefix)) byReason[k.slice(prefix.length)] = v;
  return { since: s?.startedAt ?? null, byReason };
}

/** Broker refusals (`refused.*`) and ingester rejections (`reject.*`) from the services' status rows. */
export function refusalsFrom(broker: ServiceStatus | null, ingester: ServiceStatus | null): Refusals {
  return { broker: byPrefix(broker, "refused."), ingester: byPrefix(ingester, "reject.") };
}

export function readHealth(): Health {
  const time = Date.now();
  try {
    const db = getDb();
    const sqlite = db.$client;
    const journalMode = String(sqlite.pragma("journal_mode", { simple: true }));
    const { n } = sqlite.prepare("SELECT count(*) AS n FROM __drizzle_migrations").get() as { n: number };
    const ingester = getIngesterStatus(db, time);
    const broker = getBrokerStatus(db, time);
    const ingesting = ingester !== null && !ingester.stale && ingester.connected;
    return {
      status: ingesting ? "ok" : "degraded",
      version,
      time,
      database: { ok: true, migrations: n, journalMode },
      ingester,
      broker,
      refusals: refusalsFrom(broker, ingester),
    };
  } catch (e) {
    return {
      status: "degraded",
      version,
      time,
      database: { ok: false, migrations: 0, journalMode: "", error: e instanceof Error ? e.message : String(e) },
      ingester: null,
      broker: null,
      refusals: refusalsFrom(null, null),
    };
  }
}
