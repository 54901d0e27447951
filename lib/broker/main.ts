import { openDatabase } from "@/db/client";
import { startBroker } from "./broker";

// The embedded MQTT broker on its own (MQTT_PORT, MQTT_HOST). Run with tsx.
const db = openDatabase();
const broker = await startBroker({ db });

let stopping = false;
async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`[broker] ${signal}: closing`);
  const force = setTimeout(() => process.exit(1), 10_000);
  try {
    await broker.close();
    db.$client.close();
  } finally {
    clearTimeout(force);
    process.exit(0);
  }
}
process.on("SIGINT", () => void stop("SIGINT"));
process.on("SIGTERM", () => void stop("SIGTERM"));
