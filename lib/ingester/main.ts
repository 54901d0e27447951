import { openDatabase } from "@/db/client";
import { syncServiceAlarms } from "@/lib/service/alarms";
import { ingesterOptionsFromEnv } from "./config";
import { startIngester } from "./ingester";

// Node only: MQTT → validation → SQLite, with the live WebSocket hub. Run with tsx.
const db = openDatabase();
const ingester = await startIngester(ingesterOptionsFromEnv(db));

// Service tasks come due with the hour meter and the calendar: judged once a minute (and at start).
function sweepService() {
  try {
    const t = syncServiceAlarms(db, Date.now());
    if (t.length) console.log(`[ingester] service alarms: ${t.map((x) => `${x.action} ${x.key} on ${x.compressorId}`).join(", ")}`);
  } catch (e) {
    console.error(`[ingester] service alarm sweep failed: ${(e as Error).message}`);
  }
}
sweepService();
const serviceTimer = setInterval(sweepService, 60_000);

let stopping = false;
async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`[ingester] ${signal}: flushing and closing`);
  const force = setTimeout(() => process.exit(1), 10_000);
  try {
    clearInterval(serviceTimer);
    await ingester.close();
    db.$client.close();
  } finally {
    clearTimeout(force);
    process.exit(0);
  }
}
process.on("SIGINT", () => void stop("SIGINT"));
process.on("SIGTERM", () => void stop("SIGTERM"));
