import path from "node:path";

// E2E_PORT_BASE lets two checkouts run their browser tests side by side.
const base = Number(process.env.E2E_PORT_BASE ?? 0);

/** Where the end-to-end run keeps its own database, ports and secrets, apart from a running demo. */
export const e2e = {
  port: 3100 + base,
  mqttPort: 18831 + base,
  livePort: 13101 + base,
  smtpPort: 12526 + base,
  s3Port: 14569 + base,
  databaseUrl: path.resolve("data/e2e/airkeep.db"),
  get baseURL() {
    return `http://localhost:${this.port}`;
  },
  get devicesFile() {
    return path.join(path.dirname(this.databaseUrl), "demo-devices.json");
  },
};
