import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import type { Db } from "@/db/client";
import { createSession } from "@/db/sessions";
import { readSetRows } from "@/db/threshold-edit";
import { limitKey } from "@/shared/alarm-rules";
import type { Role } from "@/shared/roles";
import { makeTempDb, modelLimits, seedFleet, type Fleet, type TempDb } from "./alarms-fixtures";

// The server actions themselves, called as a browser would call them, with a signed-in person of each role: the
// session comes from next-auth (stubbed here to name the session row), everything after it is the real path —
// runAction, the permission table, the session check against the database, the save and its audit.

const session = vi.hoisted(() => ({ current: null as { uid: number; sid: string } | null }));
vi.mock("next-auth", async (importOriginal) => ({
  ...(await importOriginal<typeof import("next-auth")>()),
  getServerSession: async () => session.current,
}));
vi.mock("next/headers", () => ({ headers: async () => new Headers({ "x-forwarded-for": "192.0.2.10" }) }));

const { saveThresholds, revertThresholds } = await import("@/lib/actions/thresholds");
// As behind Airkeep's web server, which rewrites X-Forwarded-For to the client's address before the app reads it.
(await import("@/lib/web/request-facts")).markForwardedHeadersChecked();

let t: TempDb;
let db: Db;
let fleet: Fleet;
const users = new Map<Role, number>();

beforeAll(() => {
  t = makeTempDb("airkeep-threshold-actions-");
  db = t.db;
  (globalThis as unknown as { airkeepDb?: Db }).airkeepDb = db;
  fleet = seedFleet(db);
  for (const role of ["viewer", "supervisor", "technician", "engineer", "admin"] as Role[]) {
    const id = Number(
      db.$client
        .prepare("INSERT INTO users (email, name, password_hash, role, all_sites, created_at, updated_at) VALUES (?, ?, 'x', ?, 1, 0, 0)")
        .run(`${role}@airkeep.test`, `A ${role}`, role).lastInsertRowid,
    );
    createSession(db, { id: `sid-${role}`, userId: id, ip: "192.0.2.10" });
    users.set(role, id);
  }
});
afterAll(() => {
  delete (globalThis as unknown as { airkeepDb?: Db }).airkeepDb;
  t.cleanup();
});

function signIn(role: Role | null) {
  session.current = role ? { uid: users.get(role)!, sid: `sid-${role}` } : null;
}

const WARNING = "finalStageC.high.warning";
const version = () => db.$client.prepare("SELECT version FROM threshold_sets WHERE scope_type = 'model' AND scope_id = ?").pluck().get(fleet.modelId) as number;
const proposal = (value: number) => ({
  scopeType: "model",
  scopeId: fleet.modelId,
  baseVersion: version(),
  reason: "Warn earlier after the cooler change",
  limits: modelLimits.map((l) => ({ ...l, enabled: true, ...(limitKey(l) === WARNING ? { value } : {}) })),
});
const warningValue = () => readSetRows(db, "model", fleet.modelId).find((r) => limitKey(r) === WARNING)!.value;

beforeEach(() => signIn(null));

describe("who may save thresholds (thresholds.edit: engineer, admin)", () => {
  for (const role of ["viewer", "supervisor", "technician"] as const) {
    it(`a ${role} is refused with the reason, and nothing changes`, async () => {
      signIn(role);
      const before = version();
      const res = await saveThresholds(proposal(150));
      expect(res).toEqual({ ok: false, status: 403, error: "Only engineer, administrator accounts may do this." });
      expect(version()).toBe(before);
      expect(warningValue()).toBe(160);
      expect(db.$client.prepare("SELECT count(*) FROM audit_log WHERE action = 'threshold.update'").pluck().get()).toBe(0);
    });
  }

  it("nobody signed in gets 401", async () => {
    expect(await saveThresholds(proposal(150))).toMatchObject({ ok: false, status: 401 });
  });

  it("an engineer saves; the audit names them and their address; a stale retry is refused with 409", async () => {
    signIn("engineer");
    const stale = proposal(150);
    const res = await saveThresholds(stale);
    expect(res).toMatchObject({ ok: true, data: { version: stale.baseVersion + 1 } });
    expect(warningValue()).toBe(150);
    expect(db.$client.prepare("SELECT actor, ip FROM audit_log WHERE action = 'threshold.update'").get()).toEqual({
      actor: "engineer@airkeep.test",
      ip: "192.0.2.10",
    });
    const again = await saveThresholds({ ...stale, limits: proposal(145).limits });
    expect(again).toMatchObject({ ok: false, status: 409 });
    expect(again.ok ? "" : again.error).toMatch(/newer values are shown/);
    expect(warningValue()).toBe(150);
  });

  it("field errors come back keyed by their field", async () => {
    signIn("admin");
    const res = await saveThresholds({ ...proposal(190), reason: "no" });
    expect(res).toMatchObject({
      ok: false,
      status: 400,
      fieldErrors: { reason: ["Say why, in at least 5 characters"], "limits.0.value": ["Must be below the critical high limit (180 °C)"] },
    });
  });

  it("a supervisor cannot revert either; an admin can", async () => {
    const auditId = db.$client.prepare("SELECT max(id) FROM audit_log WHERE action = 'threshold.update'").pluck().get() as number;
    signIn("supervisor");
    expect(await revertThresholds({ auditId, baseVersion: version() })).toMatchObject({ ok: false, status: 403 });
    signIn("admin");
    expect(await revertThresholds({ auditId, baseVersion: version() })).toMatchObject({ ok: true });
    expect(warningValue()).toBe(160);
  });
});
