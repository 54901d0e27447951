import { databasePath, openDatabase } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { keptSecret } from "@/lib/kept-secret";
import { startServices } from "./services";
import { stopOnSignals } from "./processes";

const env: NodeJS.ProcessEnv = { ...process.env, NEXT_TELEMETRY_DISABLED: "1" };
env.PORT ??= "3000";
env.HOST ??= "127.0.0.1";
env.NEXTAUTH_URL ??= `http://localhost:${env.PORT}`;
if (!env.NEXTAUTH_SECRET) {
  console.warn("[airkeep] NEXTAUTH_SECRET is not set; using the one kept in the data folder.");
  env.NEXTAUTH_SECRET = keptSecret("nextauth.secret");
}


const db = openDatabase();
runMigrations(db);
db.$client.close();
console.log(`[airkeep] database ${databasePath()} migrated`);

stopOnSignals();
const where = await startServices(env, { simulator: false });
console.log(`[airkeep] running at ${env.NEXTAUTH_URL}\n${where.map((l) => `  ${l}`).join("\n")}`);
