import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Db } from "@/db/client";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-auth-"));
process.env.DATABASE_URL = path.join(dir, "airkeep.db");

let db: Db;
let authenticate: typeof import("@/lib/auth/options").authenticate;
let resolveSession: typeof import("@/lib/auth/session-check").resolveSession;
let setDisabled: (email: string, disabled: boolean) => void;

beforeAll(async () => {
  const { getDb } = await import("@/db/client");
  const { runMigrations } = await import("@/db/migrate");
  const { seedDemo } = await import("@/db/seed");
  db = getDb();
  runMigrations(db);
  seedDemo(db);
  ({ authenticate } = await import("@/lib/auth/options"));
  ({ resolveSession } = await import("@/lib/auth/session-check"));
  setDisabled = (email, disabled) =>
    db.$client.prepare("UPDATE users SET disabled = ? WHERE email = ?").run(disabled ? 1 : 0, email);
});

afterAll(() => {
  db.$client.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const auditCount = (action: string, actor: string) =>
  (db.$client.prepare("SELECT count(*) AS n FROM audit_log WHERE action = ? AND actor = ?").get(action, actor) as { n: number }).n;

describe("sign-in", () => {
  it("signs in with the right password, opens a session and audits it", async () => {
    const user = await authenticate("Engineer@airkeep.demo", "airkeep-demo", "10.0.0.1");
    expect(user.role).toBe("engineer");
    expect(auditCount("auth.sign_in", "engineer@airkeep.demo")).toBe(1);
    const me = resolveSession(db, { uid: Number(user.id), sid: user.sid });
    expect(me?.email).toBe("engineer@airkeep.demo");
    expect(me?.siteIds).toBeNull();
  });

  it("refuses a wrong password with a clear message and audits the failure", async () => {
    await expect(authenticate("viewer@airkeep.demo", "wrong", "10.0.0.2")).rejects.toThrow("Wrong e-mail address or password.");
    await expect(authenticate("nobody@airkeep.demo", "wrong", "10.0.0.2")).rejects.toThrow("Wrong e-mail address or password.");
    expect(auditCount("auth.sign_in_failed", "viewer@airkeep.demo")).toBe(1);
    expect(auditCount("auth.sign_in_failed", "nobody@airkeep.demo")).toBe(1);
  });

  it("pauses an account after 5 failures, even with the right password, from any address", async () => {
    for (let i = 0; i < 5; i++) {
      await expect(authenticate("manager@airkeep.demo", `guess-${i}`, `10.1.0.${i}`)).rejects.toThrow(/Wrong/);
    }
    await expect(authenticate("manager@airkeep.demo", "airkeep-demo", "10.1.0.99")).rejects.toThrow(/Too many failed sign-ins/);
    expect(auditCount("auth.sign_in_throttled", "manager@airkeep.demo")).toBe(1);
    // Another account is not affected.
    await expect(authenticate("supervisor@airkeep.demo", "airkeep-demo", "10.1.0.99")).resolves.toMatchObject({ role: "supervisor" });
  });

  it("pauses an address after 20 failures across accounts", async () => {
    for (let i = 0; i < 20; i++) {
      await expect(authenticate(`someone${i}@example.org`, "x", "10.9.9.9")).rejects.toThrow(/Wrong/);
    }
    await expect(authenticate("technician@airkeep.demo", "airkeep-demo", "10.9.9.9")).rejects.toThrow(/Too many/);
    await expect(authenticate("technician@airkeep.demo", "airkeep-demo", "10.9.9.8")).resolves.toMatchObject({ role: "technician" });
  });

  it("refuses a disabled account, and its open session at the next request", async () => {
    const user = await authenticate("admin@airkeep.demo", "airkeep-demo", "10.2.0.1");
    const claims = { uid: Number(user.id), sid: user.sid };
    expect(resolveSession(db, claims)).not.toBeNull();
    setDisabled("admin@airkeep.demo", true);
    expect(resolveSession(db, claims)).toBeNull();
    await expect(authenticate("admin@airkeep.demo", "airkeep-demo", "10.2.0.1")).rejects.toThrow(/disabled/);
    setDisabled("admin@airkeep.demo", false);
    expect(resolveSession(db, claims)).not.toBeNull();
  });
});

describe("session lifetime", () => {
  const policy = { idleMs: 60 * 60_000, absoluteMs: 8 * 60 * 60_000, failureWindowMs: 0, maxFailuresPerAccount: 5, maxFailuresPerAddress: 20 };

  it("expires after the idle time without use, and is kept alive by use", async () => {
    const user = await authenticate("supervisor@airkeep.demo", "airkeep-demo", "10.3.0.1");
    const claims = { uid: Number(user.id), sid: user.sid };
    const t0 = Date.now();
    expect(resolveSession(db, claims, t0 + 50 * 60_000, policy)).not.toBeNull(); // touches the session
    expect(resolveSession(db, claims, t0 + 100 * 60_000, policy)).not.toBeNull(); // 50 min after last use
    expect(resolveSession(db, claims, t0 + 161 * 60_000, policy)).toBeNull(); // 61 min idle
  });

  it("expires after the absolute lifetime however active", async () => {
    const user = await authenticate("viewer@airkeep.demo", "airkeep-demo", "10.3.0.2");
    const claims = { uid: Number(user.id), sid: user.sid };
    const t0 = Date.now();
    for (let h = 1; h < 8; h++) expect(resolveSession(db, claims, t0 + h * 55 * 60_000, policy)).not.toBeNull();
    expect(resolveSession(db, claims, t0 + 8 * 60 * 60_000 + 1000, policy)).toBeNull();
  });

  it("refuses a token whose session id belongs to someone else", async () => {
    const a = await authenticate("engineer@airkeep.demo", "airkeep-demo", "10.3.0.3");
    const b = await authenticate("technician@airkeep.demo", "airkeep-demo", "10.3.0.3");
    expect(resolveSession(db, { uid: Number(a.id), sid: b.sid })).toBeNull();
  });
});
