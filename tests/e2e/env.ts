import path from "node:path";

/** Where the end-to-end run keeps its own database, ports and secrets, apart from a running demo. */
export const e2e = {
  port: 3100,
  mqttPort: 18831,
  livePort: 13101,
  smtpPort: 12526,
  databaseUrl: path.resolve("data/e2e/airkeep.db"),
  get baseURL() {
    return `http://localhost:${this.port}`;
  },
  get devicesFile() {
    return path.join(path.dirname(this.databaseUrl), "demo-devices.json");
  },
};
