import { openDatabase } from "@/db/client";
import { ingesterOptionsFromEnv } from "./config";
import { startIngester } from "./ingester";

// Node only: MQTT → validation → SQLite, with the live WebSocket hub. Run with tsx.
const db = openDatabase();
const ingester = await startIngester(ingesterOptionsFromEnv(db));

let stopping = false;
async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`[ingester] ${signal}: flushing and closing`);
  const force = setTimeout(() => process.exit(1), 10_000);
  try {
    await ingester.close();
    db.$client.close();
  } finally {
    clearTimeout(force);
    process.exit(0);
  }
}
process.on("SIGINT", () => void stop("SIGINT"));
process.on("SIGTERM", () => void stop("SIGTERM"));
