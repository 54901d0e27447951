import fs from "node:fs";
import path from "node:path";
import { startProcess } from "./processes";

const tsx = path.resolve("node_modules/.bin/tsx");
const next = path.resolve("node_modules/next/dist/bin/next");

/** Starts broker (unless MQTT_URL names another), ingester, optionally the simulator, and the web server. */
export async function startServices(env: NodeJS.ProcessEnv, opts: { simulator: boolean }): Promise<string[]> {
  const where: string[] = [];
  const mqttPort = env.MQTT_PORT ?? "1883";
  if (!env.MQTT_URL) {
    if (fs.existsSync("lib/broker/main.ts")) {
      startProcess("broker", tsx, ["lib/broker/main.ts"], env);
      where.push(`MQTT       mqtt://127.0.0.1:${mqttPort} (embedded broker)`);
    }
    env.MQTT_URL = `mqtt://127.0.0.1:${mqttPort}`;
  } else {
    where.push(`MQTT       ${env.MQTT_URL} (external broker)`);
  }
  if (fs.existsSync("lib/ingester/main.ts")) {
    startProcess("ingester", tsx, ["lib/ingester/main.ts"], env);
    where.push(`Live       ws://${env.LIVE_HOST ?? "127.0.0.1"}:${env.LIVE_PORT ?? "3001"} (WebSocket hub)`);
  }
  if (opts.simulator && fs.existsSync("simulator/main.ts")) {
    startProcess("simulator", tsx, ["simulator/main.ts"], env);
    where.push("Simulator  publishing the demo fleet");
  }
  startProcess("web", process.execPath, [next, "start", "-p", env.PORT ?? "3000", "-H", env.HOST ?? "127.0.0.1"], env);
  return where;
}
