import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Db } from "@/db/client";

// Sign-in limits under concurrency, the address they count by, and next-auth's own session endpoint for a session
// that has ended. Real SQLite file, real bcrypt.

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-signin-"));
process.env.DATABASE_URL = path.join(dir, "airkeep.db");

let db: Db;
let authenticate: typeof import("@/lib/auth/options").authenticate;
let authOptions: typeof import("@/lib/auth/options").authOptions;

beforeAll(async () => {
  const { getDb } = await import("@/db/client");
  const { runMigrations } = await import("@/db/migrate");
  const { seedDemo } = await import("@/db/seed");
  db = getDb();
  runMigrations(db);
  seedDemo(db);
  ({ authenticate, authOptions } = await import("@/lib/auth/options"));
});

afterAll(() => {
  db.$client.close();
  fs.rmSync(dir, { recursive: true, force: true });
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
