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
let authOptions: typeof import("@/lib/auth/options").authOptions;
let setDisabled: (email: string, disabled: boolean) => void;

beforeAll(async () => {
  const { getDb } = await import("@/db/client");
  const { runMigrations } = await import("@/db/migrate");
  const { seedDemo } = await import("@/db/seed");
  db = getDb();
  runMigrations(db);
  seedDemo(db);
  ({ authenticate, authOptions } = await import("@/lib/auth/options"));
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

const failures = (reason: string, actor: string) =>
  (
    db.$client
      .prepare("SELECT count(*) AS n FROM audit_log WHERE action = 'auth.sign_in_failed' AND actor = ? AND json_extract(details, '$.reason') = ?")
      .get(actor, reason) as { n: number }
  ).n;

describe("sign-in limits under parallel tries", () => {
  it("checks no more passwords than the account limit, and refuses the right one after them", async () => {
    const email = "supervisor@airkeep.demo";
    const tries = Array.from({ length: 25 }, (_, i) =>
      authenticate(email, `wrong-${i}`, `10.50.0.${i}`).then(
        () => "in",
        (e: Error) => e.message,
      ),
    );
    const outcomes = await Promise.all(tries);
    const checked = failures("password", email);
    console.log(`[figure] sign-in attempts checked under 25 parallel tries: ${checked} (account limit 5)`);
    expect(checked).toBeLessThanOrEqual(5);
    expect(outcomes.filter((m) => /Wrong e-mail/.test(m))).toHaveLength(checked);
    expect(outcomes.filter((m) => /Too many failed sign-ins/.test(m))).toHaveLength(25 - checked);
    await expect(authenticate(email, "airkeep-demo", "10.50.1.1")).rejects.toThrow(/Too many failed sign-ins/);
  });

  it("holds the per-address limit for parallel tries across accounts", async () => {
    process.env.SIGNIN_MAX_FAILURES_ADDRESS = "8";
    const tries = Array.from({ length: 25 }, (_, i) => authenticate(`nobody${i}@example.org`, "x", "10.60.0.1").then(
        () => "in",
        (e: Error) => e.message,
      ),
    );
    const outcomes = await Promise.all(tries);
    expect(outcomes.filter((m) => /Wrong e-mail/.test(m))).toHaveLength(8);
    await expect(authenticate("engineer@airkeep.demo", "airkeep-demo", "10.60.0.1")).rejects.toThrow(/Too many/);
    delete process.env.SIGNIN_MAX_FAILURES_ADDRESS;
  });

  it("a successful sign-in does not count toward the limits", async () => {
    for (let i = 0; i < 6; i++) await expect(authenticate("viewer@airkeep.demo", "airkeep-demo", "10.70.0.1")).resolves.toBeTruthy();
  });
});

describe("next-auth's session endpoint", () => {
  it("gives nobody for the token of a signed-out session", async () => {
    const { revokeSession } = await import("@/db/sessions");
    const user = await authenticate("technician@airkeep.demo", "airkeep-demo", "10.80.0.1");
    const jwt = authOptions.callbacks!.jwt! as (p: { token: Record<string, unknown>; user?: unknown }) => Promise<Record<string, unknown>>;
    const signedIn = await jwt({ token: {}, user });
    // While the session is open the token passes on; next-auth calls this for /api/auth/session and getServerSession.
    await expect(jwt({ token: signedIn })).resolves.toMatchObject({ sid: user.sid });
    revokeSession(db, user.sid);
    await expect(jwt({ token: signedIn })).rejects.toThrow(/session has ended/);
  });
});
