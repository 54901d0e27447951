import { randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { databasePath } from "@/db/client";

/**
 * A random secret kept in the data folder (beside the database), created on first use, readable by the owner only.
 * Written aside and linked into place, so a process starting at the same moment never reads half a file.
 */
export function keptSecret(name: string, dbFile = databasePath()): string {
  const file = path.join(path.dirname(dbFile), name);
  fs.mkdirSync(path.dirname(file), { recursive: true });
  if (!fs.existsSync(file)) {
    const tmp = `${file}.${process.pid}.${randomBytes(4).toString("hex")}`;
    fs.writeFileSync(tmp, `${randomBytes(32).toString("base64url")}\n`, { mode: 0o600 });
    try {
      fs.linkSync(tmp, file);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== "EEXIST") throw e;
    } finally {
      fs.rmSync(tmp, { force: true });
    }
  }
  const secret = fs.readFileSync(file, "utf8").trim();
  if (secret.length < 16) throw new Error(`${file} holds no usable secret`);
  return secret;
}
