import fs from "node:fs";
import path from "node:path";
import { parseArgs } from "node:util";
import { databasePath, openDatabase } from "@/db/client";
import { DEMO_PASSWORD, demoEmail, demoUsers } from "@/db/demo-scenario";
import { runMigrations } from "@/db/migrate";
import { seedDemo } from "@/db/seed";
import { buildIfNeeded } from "./build-if-needed";
import { queueFilePath } from "@/lib/broker/queue-file";
import { keptSecret } from "@/lib/kept-secret";
import { dataDir } from "./data-dir";
import { readDeviceSecrets, writeDemoDevices } from "./demo-devices";
import { startServices } from "./services";
import { stopOnSignals } from "./processes";

const { values: flags } = parseArgs({
  options: {
    reset: { type: "boolean", default: false },
    "skip-build": { type: "boolean", default: false },
    "no-simulator": { type: "boolean", default: false },
    "backfill-days": { type: "string", default: "90" },
  },
});

if (flags.reset) {
  const file = databasePath();
  for (const f of [file, queueFilePath(file)]) for (const suffix of ["", "-wal", "-shm"]) fs.rmSync(f + suffix, { force: true });
}

const env: NodeJS.ProcessEnv = { ...process.env, NEXT_TELEMETRY_DISABLED: "1" };
env.PORT ??= "3000";
env.HOST ??= "127.0.0.1";
env.NEXTAUTH_URL ??= `http://localhost:${env.PORT}`;
env.NEXTAUTH_SECRET ??= keptSecret("nextauth.secret");


const db = openDatabase();
runMigrations(db);
const devicesFile = path.join(dataDir(), "demo-devices.json");
const seeded = seedDemo(db, readDeviceSecrets(devicesFile));
writeDemoDevices(db, devicesFile, seeded.deviceSecrets);
db.$client.close();
console.log(`[airkeep] database ${databasePath()} migrated; demo data: ${JSON.stringify(seeded.created)}`);

stopOnSignals();
if (!flags["skip-build"]) await buildIfNeeded(env);
const where = await startServices(env, {
  simulator: !flags["no-simulator"],
  backfillDays: Math.max(0, Number(flags["backfill-days"]) || 0),
});

console.log(`
  Airkeep demo is running.
    Web        ${env.NEXTAUTH_URL}
${where.map((line) => `    ${line}`).join("\n")}

  Demo sign-ins (password "${DEMO_PASSWORD}"):
${demoUsers.map((u) => `    ${demoEmail(u.role).padEnd(28)} ${u.role}`).join("\n")}

  Airkeep is a monitoring aid, not a safety device. Ctrl-C stops everything.
`);
