import { randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { databasePath } from "@/db/client";

export function dataDir(): string {
  return path.dirname(databasePath());
}

/** Reads a secret kept in the data folder, creating it (mode 600) on first use. */
export function keptSecret(name: string): string {
  const file = path.join(dataDir(), name);
  try {
    const value = fs.readFileSync(file, "utf8").trim();
    if (value) return value;
  } catch {
    // first start
  }
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const value = randomBytes(32).toString("base64url");
  fs.writeFileSync(file, `${value}\n`, { mode: 0o600 });
  return value;
}
