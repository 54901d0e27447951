import path from "node:path";
import { databasePath, openDatabase } from "@/db/client";
import { clearHistoryBackfill, markHistoryBackfill } from "@/db/history-backfill";
import { bundleNodeProgram, programFlags } from "./node-bundle";
import { runJob, startProcess } from "./processes";

const tsx = path.resolve("node_modules/.bin/tsx");
const next = path.resolve("node_modules/next/dist/bin/next");

export type ServiceOptions = {
  /** Publish the demo fleet; first write the missing history (backfillDays) while everything else already runs. */
  simulator: boolean;
  backfillDays?: number;
};

/** Starts broker (unless MQTT_URL names another), ingester, mail, web and optionally the simulator; returns where each listens. */
export async function startServices(env: NodeJS.ProcessEnv, opts: ServiceOptions): Promise<string[]> {
  const where: string[] = [];
  // The long-running server programs run bundled, on plain Node (source maps keep stack traces pointing at the sources).
  const program = async (name: string) => [...programFlags(name), await bundleNodeProgram(`lib/${name}/main.ts`, `.build/node/${name}.mjs`)];
  if (!env.MQTT_URL) {
    const port = env.MQTT_PORT ?? "1883";
    startProcess("broker", process.execPath, await program("broker"), env);
    env.MQTT_URL = `mqtt://127.0.0.1:${port}`;
    env.MQTT_MAX_INFLIGHT ??= "none";
    where.push(`MQTT       ${env.MQTT_URL} (embedded broker)`);
  } else {
    where.push(`MQTT       ${env.MQTT_URL} (external broker)`);
  }
  startProcess("ingester", process.execPath, await program("ingester"), env);
  where.push(`Live       ws://${env.LIVE_HOST ?? "127.0.0.1"}:${env.LIVE_PORT ?? "3001"} (WebSocket hub)`);
  const backfillDays = opts.simulator ? (opts.backfillDays ?? 0) : 0;
  // Set before the mail process starts, so its first look at due monthly reports already sees history coming.
  if (backfillDays > 0) withDatabase(env, (db) => markHistoryBackfill(db, process.pid));
  startProcess("mail", process.execPath, await program("mail"), env);
  where.push(
    env.SMTP_URL
      ? "Mail       alarm e-mail via SMTP_URL"
      : `Mail       smtp://127.0.0.1:${env.SMTP_PORT ?? "2525"} (SMTP fake; read it at /admin/mailbox)`,
  );
  startProcess("web", process.execPath, [next, "start", "-p", env.PORT ?? "3000", "-H", env.HOST ?? "127.0.0.1"], env);

  if (opts.simulator) {
    const days = opts.backfillDays ?? 0;
    where.push(days > 0 ? `Simulator  writing up to ${days} days of history first, then publishing live` : "Simulator  publishing the demo fleet");
    void (async () => {
      if (days > 0) {
        const code = await runJob("backfill", tsx, ["simulator/main.ts", "--backfill", `${days}d`], env);
        withDatabase(env, clearHistoryBackfill);
        if (code !== 0) console.error(`[airkeep] backfill ended with ${code}; the live simulator starts anyway.`);
      }
      startProcess("simulator", tsx, ["simulator/main.ts", "--opening"], env);
    })();
  }
  return where;
}

function withDatabase(env: NodeJS.ProcessEnv, fn: (db: ReturnType<typeof openDatabase>) => void) {
  const db = openDatabase(databasePath(env.DATABASE_URL));
  try {
    fn(db);
  } finally {
    db.$client.close();
  }
}
