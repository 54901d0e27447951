import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { count, eq } from "drizzle-orm";
import { afterAll, afterEach, beforeEach, describe, expect, it } from "vitest";
import {
  AdminRefusal,
  adminCreateCompressor,
  adminCreateModel,
  adminCreateSite,
  adminInviteUser,
  adminSetDeviceCredential,
  adminUpdateCompressor,
  adminUpdateModel,
  adminUpdateSite,
  adminUpdateUser,
  type AdminActor,
} from "@/db/admin";
import { openDatabase, type Db } from "@/db/client";
import { getCompressor, getModel, listCompressors } from "@/db/compressors";
import { runMigrations } from "@/db/migrate";
import { auditLog, compressors, compressorModels, sites, users, userSites } from "@/db/schema";
import { createSession, findSession } from "@/db/sessions";
import { getSite } from "@/db/sites";
import { createUser, getUserDto } from "@/db/users";
import { verifyPassword } from "@/lib/auth/password";
import type { CompressorInput } from "@/shared/compressor-schema";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-admin-"));
let n = 0;
let db: Db;
let actor: AdminActor;

afterEach(() => db.$client.close());
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

beforeEach(() => {
  db = openDatabase(path.join(dir, `test-${++n}.db`));
  runMigrations(db);
  const admin = createUser(db, { email: "root@example.org", name: "Root", role: "admin", passwordHash: "x", allSites: true, siteIds: [] });
  actor = { userId: admin.id, email: admin.email, ip: "127.0.0.1" };
});

const rows = (table: typeof users | typeof sites | typeof compressors | typeof compressorModels | typeof auditLog | typeof userSites) =>
  db.select({ n: count() }).from(table).get()!.n;

const auditActions = () => db.select().from(auditLog).all().map((a) => a.action);

/** Calls fn and returns the AdminRefusal it throws (fails the test if it does not). */
function refusal(fn: () => unknown): AdminRefusal {
  try {
    fn();
  } catch (e) {
    if (e instanceof AdminRefusal) return e;
    throw e;
  }
  throw new Error("expected a refusal");
}

/** Makes every audit write fail, as a full disk or a lost file would. */
function breakAudit() {
  db.$client.exec(`CREATE TRIGGER audit_broken BEFORE INSERT ON audit_log BEGIN SELECT RAISE(ABORT, 'audit unavailable'); END;`);
}

const north = { name: "North station", code: "north", timeZone: "Europe/London", address: "1 Quay Road" };
const south = { name: "South dive centre", code: "south", timeZone: "Australia/Hobart", address: "" };
const quad = { name: "Quad 420", maker: "", stages: 4, ratedDeliveryLpm: 680, ratedPressureBar: 420 };
const triple = { name: "Triple 330", maker: "", stages: 3, ratedDeliveryLpm: 280, ratedPressureBar: 330 };

function setup() {
  const s1 = adminCreateSite(db, north, actor);
  const s2 = adminCreateSite(db, south, actor);
  const m1 = adminCreateModel(db, quad, actor);
  const m2 = adminCreateModel(db, triple, actor);
  const unit = (over: Partial<CompressorInput> = {}): CompressorInput => ({
    name: "Plant A",
    siteId: s1.id,
    modelId: m2.id,
    serial: "SN-100",
    deviceId: "north-a",
    stopPressureBar: 300,
    restartPressureBar: 270,
    bankVolumeL: 200,
    inService: true,
    ...over,
  });
  return { s1, s2, m1, m2, unit };
}

describe("users", () => {
  it("invites a user with a site scope and audits it without the password hash", () => {
    const { s1, s2 } = setup();
    const u = adminInviteUser(db, { email: "ana@example.org", name: "Ana", role: "technician", allSites: false, siteIds: [s2.id, s1.id, s2.id], passwordHash: "hash" }, actor);
    expect(getUserDto(db, u.id)).toMatchObject({ role: "technician", allSites: false, siteIds: [s1.id, s2.id], disabled: false });
    const entry = db.select().from(auditLog).where(eq(auditLog.action, "user.invite")).get()!;
    expect(entry).toMatchObject({ actor: "root@example.org", actorUserId: actor.userId, targetType: "user", targetId: String(u.id), ip: "127.0.0.1" });
    expect(entry.details).toEqual({ after: { email: "ana@example.org", name: "Ana", role: "technician", allSites: false, siteIds: [s1.id, s2.id], disabled: false } });
    expect(JSON.stringify(entry.details)).not.toContain("hash");
  });

  it("refuses a duplicate e-mail as a field error and writes nothing", () => {
    adminInviteUser(db, { email: "ana@example.org", name: "Ana", role: "viewer", allSites: true, siteIds: [], passwordHash: "h" }, actor);
    const before = { users: rows(users), audit: rows(auditLog) };
    const r = refusal(() =>
      adminInviteUser(db, { email: "ANA@example.org", name: "Other Ana", role: "admin", allSites: true, siteIds: [], passwordHash: "h" }, actor),
    );
    expect(r.status).toBe(409);
    expect(r.fieldErrors).toEqual({ email: ["An account with this e-mail address already exists"] });
    expect({ users: rows(users), audit: rows(auditLog) }).toEqual(before);
  });

  it("rolls the new account back when its site scope cannot be written", () => {
    const { s1 } = setup();
    const before = { users: rows(users), scopes: rows(userSites), audit: rows(auditLog) };
    const r = refusal(() =>
      adminInviteUser(db, { email: "ben@example.org", name: "Ben", role: "viewer", allSites: false, siteIds: [s1.id, 9999], passwordHash: "h" }, actor),
    );
    expect(r.status).toBe(409);
    expect(r.fieldErrors?.siteIds).toBeDefined();
    expect({ users: rows(users), scopes: rows(userSites), audit: rows(auditLog) }).toEqual(before);
    expect(db.select().from(users).where(eq(users.email, "ben@example.org")).get()).toBeUndefined();
  });

  it("rolls the account and its scope back when the audit row cannot be written", () => {
    const { s1 } = setup();
    const before = { users: rows(users), scopes: rows(userSites) };
    breakAudit();
    expect(() =>
      adminInviteUser(db, { email: "cat@example.org", name: "Cat", role: "viewer", allSites: false, siteIds: [s1.id], passwordHash: "h" }, actor),
    ).toThrow(/audit unavailable/);
    expect({ users: rows(users), scopes: rows(userSites) }).toEqual(before);
  });

  it("keeps the old role and scope when an update fails half-way", () => {
    const { s1, s2 } = setup();
    const u = adminInviteUser(db, { email: "dan@example.org", name: "Dan", role: "viewer", allSites: false, siteIds: [s1.id], passwordHash: "h" }, actor);
    refusal(() => adminUpdateUser(db, { id: u.id, role: "engineer", allSites: false, siteIds: [s2.id, 12345], disabled: false }, actor));
    expect(getUserDto(db, u.id)).toMatchObject({ role: "viewer", allSites: false, siteIds: [s1.id] });
  });

  it("updates role and scope and audits before and after", () => {
    const { s2 } = setup();
    const u = adminInviteUser(db, { email: "eve@example.org", name: "Eve", role: "viewer", allSites: true, siteIds: [], passwordHash: "h" }, actor);
    const after = adminUpdateUser(db, { id: u.id, role: "supervisor", allSites: false, siteIds: [s2.id], disabled: false }, actor);
    expect(after).toMatchObject({ role: "supervisor", allSites: false, siteIds: [s2.id] });
    const entry = db.select().from(auditLog).where(eq(auditLog.action, "user.update")).get()!;
    expect(entry.details).toMatchObject({
      before: { role: "viewer", allSites: true, siteIds: [] },
      after: { role: "supervisor", allSites: false, siteIds: [s2.id] },
      sessionsRevoked: false,
    });
  });

  it("refuses an unknown account with 404", () => {
    expect(refusal(() => adminUpdateUser(db, { id: 999, role: "viewer", allSites: true, siteIds: [], disabled: false }, actor)).status).toBe(404);
  });

  it("disabling revokes every session of the account; enabling does not bring them back", () => {
    const u = adminInviteUser(db, { email: "fay@example.org", name: "Fay", role: "viewer", allSites: true, siteIds: [], passwordHash: "h" }, actor);
    createSession(db, { id: "s-1", userId: u.id, ip: "" });
    createSession(db, { id: "s-2", userId: u.id, ip: "" });
    createSession(db, { id: "s-root", userId: actor.userId, ip: "" });
    adminUpdateUser(db, { id: u.id, role: "viewer", allSites: true, siteIds: [], disabled: true }, actor, 5_000);
    expect(findSession(db, "s-1")?.revokedAt).toBe(5_000);
    expect(findSession(db, "s-2")?.revokedAt).toBe(5_000);
    expect(findSession(db, "s-root")?.revokedAt).toBeNull();
    const entry = db.select().from(auditLog).where(eq(auditLog.action, "user.update")).get()!;
    expect(entry.details).toMatchObject({ before: { disabled: false }, after: { disabled: true }, sessionsRevoked: true });
    adminUpdateUser(db, { id: u.id, role: "viewer", allSites: true, siteIds: [], disabled: false }, actor, 6_000);
    expect(findSession(db, "s-1")?.revokedAt).toBe(5_000);
    expect(getUserDto(db, u.id)?.disabled).toBe(false);
  });

  describe("the last enabled administrator", () => {
    it("cannot demote or disable themselves; nothing changes and no session is revoked", () => {
      createSession(db, { id: "s-root", userId: actor.userId, ip: "" });
      const auditBefore = rows(auditLog);
      const demote = refusal(() => adminUpdateUser(db, { id: actor.userId, role: "engineer", allSites: true, siteIds: [], disabled: false }, actor));
      expect(demote.status).toBe(409);
      expect(demote.message).toMatch(/You are the last enabled administrator/);
      expect(demote.fieldErrors?.role).toBeDefined();
      const disable = refusal(() => adminUpdateUser(db, { id: actor.userId, role: "admin", allSites: true, siteIds: [], disabled: true }, actor));
      expect(disable.fieldErrors?.disabled).toBeDefined();
      expect(getUserDto(db, actor.userId)).toMatchObject({ role: "admin", disabled: false });
      expect(findSession(db, "s-root")?.revokedAt).toBeNull();
      expect(rows(auditLog)).toBe(auditBefore);
    });

    it("a disabled administrator does not count as another one", () => {
      const other = adminInviteUser(db, { email: "gus@example.org", name: "Gus", role: "admin", allSites: true, siteIds: [], passwordHash: "h" }, actor);
      adminUpdateUser(db, { id: other.id, role: "admin", allSites: true, siteIds: [], disabled: true }, actor);
      refusal(() => adminUpdateUser(db, { id: actor.userId, role: "viewer", allSites: true, siteIds: [], disabled: false }, actor));
      // Re-enabling the other administrator makes the change possible.
      adminUpdateUser(db, { id: other.id, role: "admin", allSites: true, siteIds: [], disabled: false }, actor);
      expect(adminUpdateUser(db, { id: actor.userId, role: "viewer", allSites: true, siteIds: [], disabled: false }, actor).role).toBe("viewer");
      // Now the other one is the last, and may not go either.
      const otherActor = { userId: other.id, email: other.email };
      refusal(() => adminUpdateUser(db, { id: other.id, role: "admin", allSites: true, siteIds: [], disabled: true }, otherActor));
    });

    it("an administrator always keeps every site, whatever scope is sent", () => {
      const { s1 } = setup();
      expect(adminUpdateUser(db, { id: actor.userId, role: "admin", allSites: false, siteIds: [s1.id], disabled: false }, actor)).toMatchObject({
        allSites: true,
        siteIds: [],
      });
    });
  });
});

describe("sites", () => {
  it("creates and updates with audit rows", () => {
    const s = adminCreateSite(db, north, actor);
    adminUpdateSite(db, s.id, { ...north, timeZone: "Europe/Dublin" }, actor);
    expect(getSite(db, s.id)?.timeZone).toBe("Europe/Dublin");
    const entries = db.select().from(auditLog).all().filter((a) => a.action.startsWith("site."));
    expect(entries.map((e) => e.action)).toEqual(["site.create", "site.update"]);
    expect(entries[1]?.siteId).toBe(s.id);
    expect(entries[1]?.details).toMatchObject({ before: { timeZone: "Europe/London" }, after: { timeZone: "Europe/Dublin" } });
  });

  it("refuses a duplicate code or name as a field error", () => {
    const a = adminCreateSite(db, north, actor);
    const b = adminCreateSite(db, south, actor);
    expect(refusal(() => adminCreateSite(db, { ...south, name: "Elsewhere" }, actor)).fieldErrors).toEqual({
      code: ["Another site already uses this code"],
    });
    expect(refusal(() => adminCreateSite(db, { ...south, code: "elsewhere" }, actor)).fieldErrors).toEqual({
      name: ["Another site already has this name"],
    });
    const r = refusal(() => adminUpdateSite(db, b.id, { ...south, code: a.code }, actor));
    expect(r.status).toBe(409);
    expect(getSite(db, b.id)?.code).toBe("south");
    expect(auditActions().filter((x) => x.startsWith("site."))).toEqual(["site.create", "site.create"]);
  });

  it("a site is not created when its audit row fails", () => {
    breakAudit();
    expect(() => adminCreateSite(db, north, actor)).toThrow();
    expect(rows(sites)).toBe(0);
  });
});

describe("compressor models", () => {
  it("refuses a duplicate name", () => {
    adminCreateModel(db, quad, actor);
    expect(refusal(() => adminCreateModel(db, { ...triple, name: quad.name }, actor)).fieldErrors).toEqual({
      name: ["Another model already has this name"],
    });
    expect(rows(compressorModels)).toBe(1);
  });

  it("refuses to lower the rated pressure below a compressor's stop pressure", () => {
    const { m2, unit } = setup();
    adminCreateCompressor(db, unit({ stopPressureBar: 320, restartPressureBar: 280 }), actor);
    const r = refusal(() => adminUpdateModel(db, m2.id, { ...triple, ratedPressureBar: 310 }, actor));
    expect(r.status).toBe(400);
    expect(r.fieldErrors?.ratedPressureBar?.[0]).toMatch(/Plant A \(320 bar\)/);
    expect(getModel(db, m2.id)?.ratedPressureBar).toBe(330);
    expect(adminUpdateModel(db, m2.id, { ...triple, ratedPressureBar: 320 }, actor).ratedPressureBar).toBe(320);
    expect(auditActions()).toContain("compressor_model.update");
  });
});

describe("compressors", () => {
  it("creates one with an audit row naming its site", () => {
    const { s1, unit } = setup();
    const c = adminCreateCompressor(db, unit(), actor);
    expect(c).toMatchObject({ siteCode: "north", modelName: "Triple 330", hasDeviceCredential: false });
    const entry = db.select().from(auditLog).where(eq(auditLog.action, "compressor.create")).get()!;
    expect(entry).toMatchObject({ siteId: s1.id, targetId: String(c.id) });
    expect(entry.details).toMatchObject({ after: { serial: "SN-100", deviceId: "north-a" } });
  });

  it("refuses a duplicate serial or device id as a field error and writes nothing", () => {
    const { unit } = setup();
    adminCreateCompressor(db, unit(), actor);
    const before = { units: rows(compressors), audit: rows(auditLog) };
    const serial = refusal(() => adminCreateCompressor(db, unit({ name: "Plant B", deviceId: "north-b" }), actor));
    expect(serial.status).toBe(409);
    expect(serial.fieldErrors).toEqual({ serial: ["Another compressor already has this serial number"] });
    const device = refusal(() => adminCreateCompressor(db, unit({ name: "Plant B", serial: "SN-200" }), actor));
    expect(device.fieldErrors).toEqual({ deviceId: ["Another compressor already uses this device id"] });
    expect({ units: rows(compressors), audit: rows(auditLog) }).toEqual(before);
  });

  it("refuses a stop pressure above the model's rated pressure, at the stop-pressure field", () => {
    const { m1, unit } = setup();
    const r = refusal(() => adminCreateCompressor(db, unit({ stopPressureBar: 345 }), actor));
    expect(r.status).toBe(400);
    expect(r.fieldErrors).toEqual({ stopPressureBar: ["Stop pressure is above the model's rated 330 bar"] });
    expect(rows(compressors)).toBe(0);
    // The same pressure is fine on the 420-bar model.
    expect(adminCreateCompressor(db, unit({ stopPressureBar: 345, modelId: m1.id }), actor).stopPressureBar).toBe(345);
  });

  it("refuses an unknown site or model at its field", () => {
    const { unit } = setup();
    const r = refusal(() => adminCreateCompressor(db, unit({ siteId: 777, modelId: 888 }), actor));
    expect(Object.keys(r.fieldErrors ?? {}).sort()).toEqual(["modelId", "siteId"]);
  });

  it("updates with before/after, and an update colliding with another unit changes nothing", () => {
    const { s2, unit } = setup();
    const a = adminCreateCompressor(db, unit(), actor);
    const b = adminCreateCompressor(db, unit({ name: "Plant B", serial: "SN-200", deviceId: "north-b" }), actor);
    const moved = adminUpdateCompressor(db, a.id, unit({ siteId: s2.id, inService: false }), actor);
    expect(moved).toMatchObject({ siteCode: "south", inService: false });
    const entry = db.select().from(auditLog).where(eq(auditLog.action, "compressor.update")).get()!;
    expect(entry.details).toMatchObject({ before: { siteId: a.siteId, inService: true }, after: { siteId: s2.id, inService: false } });
    const r = refusal(() => adminUpdateCompressor(db, b.id, unit({ name: "Plant B", serial: "SN-200" }), actor));
    expect(r.fieldErrors).toEqual({ deviceId: ["Another compressor already uses this device id"] });
    expect(getCompressor(db, b.id)?.deviceId).toBe("north-b");
  });

  it("an update is undone when its audit row fails", () => {
    const { unit } = setup();
    const a = adminCreateCompressor(db, unit(), actor);
    breakAudit();
    expect(() => adminUpdateCompressor(db, a.id, unit({ stopPressureBar: 310 }), actor)).toThrow();
    expect(getCompressor(db, a.id)?.stopPressureBar).toBe(300);
  });

  it("issuing a device credential stores only a hash and audits without the secret", async () => {
    const { unit } = setup();
    const c = adminCreateCompressor(db, unit(), actor);
    const { hashPassword } = await import("@/lib/auth/password");
    const secret = "k3Jq9-secret-for-the-test_0123456";
    const out = adminSetDeviceCredential(db, c.id, await hashPassword(secret), actor);
    expect(out.hasDeviceCredential).toBe(true);
    const stored = db.select({ h: compressors.deviceSecretHash }).from(compressors).where(eq(compressors.id, c.id)).get()!.h!;
    expect(stored).not.toContain(secret);
    expect(await verifyPassword(secret, stored)).toBe(true);
    const entry = db.select().from(auditLog).where(eq(auditLog.action, "compressor.credential_issued")).get()!;
    expect(entry.details).toEqual({ deviceId: "north-a", replacedEarlier: false });
    expect(JSON.stringify(entry)).not.toContain(secret);
    adminSetDeviceCredential(db, c.id, "another-hash", actor);
    expect(db.select().from(auditLog).where(eq(auditLog.action, "compressor.credential_issued")).all()[1]?.details).toMatchObject({
      replacedEarlier: true,
    });
    expect(listCompressors(db, null)[0]).not.toHaveProperty("deviceSecretHash");
    expect(refusal(() => adminSetDeviceCredential(db, 4242, "h", actor)).status).toBe(404);
  });
});
