import { databasePath, openDatabase } from "@/db/client";
import { runMigrations } from "@/db/migrate";

const file = databasePath();
const db = openDatabase(file);
runMigrations(db);
db.$client.close();
console.log(`Migrated ${file}`);
