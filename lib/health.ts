import fs from "node:fs";
import path from "node:path";
import { getDb } from "@/db/client";

const version: string = JSON.parse(fs.readFileSync(path.join(process.cwd(), "package.json"), "utf8")).version;

export type Health = {
  status: "ok" | "degraded";
  version: string;
  time: number;
  database: { ok: boolean; migrations: number; journalMode: string; error?: string };
};

export function readHealth(): Health {
  const time = Date.now();
  try {
    const sqlite = getDb().$client;
    const journalMode = String(sqlite.pragma("journal_mode", { simple: true }));
    const { n } = sqlite.prepare("SELECT count(*) AS n FROM __drizzle_migrations").get() as { n: number };
    return { status: "ok", version, time, database: { ok: true, migrations: n, journalMode } };
  } catch (e) {
    return {
      status: "degraded",
      version,
      time,
      database: { ok: false, migrations: 0, journalMode: "", error: e instanceof Error ? e.message : String(e) },
    };
  }
}
