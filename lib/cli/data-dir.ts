import path from "node:path";
import { databasePath } from "@/db/client";

export function dataDir(): string {
  return path.dirname(databasePath());
}
