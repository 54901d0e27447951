import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import bcrypt from "bcryptjs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openDatabase, type Db } from "@/db/client";
import { listCompressors } from "@/db/compressors";
import { DEMO_PASSWORD, demoCompressors } from "@/db/demo-scenario";
import { runMigrations } from "@/db/migrate";
import { seedDemo } from "@/db/seed";
import { listSites } from "@/db/sites";
import { findUserByEmail, listUsers } from "@/db/users";

let dir: string;
let db: Db;

beforeAll(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-seed-"));
  db = openDatabase(path.join(dir, "airkeep.db"));
  runMigrations(db);
});

afterAll(() => {
  db.$client.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe("demo seed on a real SQLite file", () => {
  it("creates the scenario: 3+ sites in 2+ zones, 6+ compressors of 4+ models, one account per role", () => {
    const first = seedDemo(db);
    expect(first.created.users).toBe(6);
    const sites = listSites(db, null);
    expect(sites.length).toBeGreaterThanOrEqual(3);
    expect(new Set(sites.map((s) => s.timeZone)).size).toBeGreaterThanOrEqual(2);
    const compressors = listCompressors(db, null);
    expect(compressors.length).toBeGreaterThanOrEqual(6);
    expect(new Set(compressors.map((c) => c.modelId)).size).toBeGreaterThanOrEqual(4);
    for (const c of compressors) expect(c.restartPressureBar).toBeLessThan(c.stopPressureBar);
    expect(listUsers(db).map((u) => u.role).sort()).toEqual(
      ["admin", "engineer", "manager", "supervisor", "technician", "viewer"],
    );
    const admin = findUserByEmail(db, "admin@airkeep.demo")!;
    expect(bcrypt.compareSync(DEMO_PASSWORD, admin.passwordHash)).toBe(true);
  });

  it("changes nothing when run again with the kept device secrets", () => {
    const before = {
      sites: listSites(db, null).length,
      compressors: listCompressors(db, null).length,
      users: listUsers(db).length,
    };
    const again = seedDemo(db);
    // Without the kept secrets every credential is reissued, but no row is added.
    expect(again.created).toEqual({ sites: 0, models: 0, compressors: 0, users: 0, credentials: demoCompressors.length });
    const third = seedDemo(db, again.deviceSecrets);
    expect(third.created).toEqual({ sites: 0, models: 0, compressors: 0, users: 0, credentials: 0 });
    expect(third.deviceSecrets).toEqual(again.deviceSecrets);
    expect({
      sites: listSites(db, null).length,
      compressors: listCompressors(db, null).length,
      users: listUsers(db).length,
    }).toEqual(before);
  });

  it("stores readings WITHOUT ROWID keyed on (compressor, time)", () => {
    const sql = (db.$client.prepare("SELECT sql FROM sqlite_master WHERE name = 'readings'").get() as { sql: string }).sql;
    expect(sql).toMatch(/WITHOUT ROWID/);
    expect(sql).toMatch(/PRIMARY KEY\(`compressor_id`, `ts`\)/);
  });
});
