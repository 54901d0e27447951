import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Db } from "@/db/client";

// "Every site" is an explicit choice: deleting the last site of a person limited to sites leaves them with none,
// never with all. Existing accounts keep what an empty list meant before (the users_all_sites_backfill migration).

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-scope-"));
process.env.DATABASE_URL = path.join(dir, "airkeep.db");

let db: Db;
let resolveSession: typeof import("@/lib/auth/session-check").resolveSession;
let createUser: typeof import("@/db/users").createUser;
let createSession: typeof import("@/db/sessions").createSession;

beforeAll(async () => {
  const { getDb } = await import("@/db/client");
  const { runMigrations } = await import("@/db/migrate");
  db = getDb();
  runMigrations(db);
  ({ resolveSession } = await import("@/lib/auth/session-check"));
  ({ createUser } = await import("@/db/users"));
  ({ createSession } = await import("@/db/sessions"));
});
afterAll(() => {
  db.$client.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const addSite = (code: string) =>
  Number(db.$client.prepare("INSERT INTO sites (name, code, time_zone, created_at) VALUES (?, ?, 'UTC', 0)").run(`Site ${code}`, code).lastInsertRowid);

function scopeOf(userId: number): number[] | null {
  const sid = `sid-${userId}-${Math.random()}`;
  createSession(db, { id: sid, userId, ip: "" });
  return resolveSession(db, { uid: userId, sid })!.siteIds;
}

describe("site scope", () => {
  it("deleting a person's only site leaves them no site, not every site", () => {
    const a = addSite("A");
    const u = createUser(db, { email: "one-site@example.org", name: "One Site", role: "viewer", passwordHash: "x", allSites: false, siteIds: [a] });
    expect(scopeOf(u.id)).toEqual([a]);
    db.$client.prepare("DELETE FROM sites WHERE id = ?").run(a);
    expect(scopeOf(u.id)).toEqual([]);
  });

  it("every site includes sites added later; administrators are never limited", () => {
    const all = createUser(db, { email: "all@example.org", name: "All", role: "manager", passwordHash: "x", allSites: true, siteIds: [] });
    const admin = createUser(db, { email: "root@example.org", name: "Root", role: "admin", passwordHash: "x", allSites: false, siteIds: [] });
    addSite("B");
    expect(scopeOf(all.id)).toBeNull();
    expect(scopeOf(admin.id)).toBeNull();
    expect(admin.allSites).toBe(true);
  });

  it("the migration gives existing accounts with no site list every site, and keeps limited ones limited", () => {
    const c = addSite("C");
    const insert = db.$client.prepare(
      "INSERT INTO users (email, name, password_hash, role, all_sites, created_at, updated_at) VALUES (?, ?, 'x', ?, 0, 0, 0)",
    );
    const legacyAll = Number(insert.run("legacy-all@example.org", "Legacy All", "viewer").lastInsertRowid);
    const legacyAdmin = Number(insert.run("legacy-admin@example.org", "Legacy Admin", "admin").lastInsertRowid);
    const legacyLimited = Number(insert.run("legacy-one@example.org", "Legacy One", "engineer").lastInsertRowid);
    db.$client.prepare("INSERT INTO user_sites (user_id, site_id) VALUES (?, ?)").run(legacyLimited, c);
    const file = fs.readdirSync("drizzle").find((f) => f.endsWith("_users_all_sites_backfill.sql"))!;
    const sql = fs.readFileSync(path.join("drizzle", file), "utf8");
    db.$client.exec(sql);
    const flag = (id: number) => (db.$client.prepare("SELECT all_sites AS f FROM users WHERE id = ?").get(id) as { f: number }).f;
    expect([flag(legacyAll), flag(legacyAdmin), flag(legacyLimited)]).toEqual([1, 1, 0]);
    expect(scopeOf(legacyLimited)).toEqual([c]);
  });
});
