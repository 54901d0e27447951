import { count, eq } from "drizzle-orm";
import { afterAll, afterEach, beforeEach, describe, expect, it } from "vitest";
import { z } from "zod";
import { AdminRefusal, type AdminActor } from "@/db/admin";
import { openDatabase, type Db } from "@/db/client";
import {
  adminCreateContact,
  adminCreateRotaEntry,
  adminCreateRule,
  adminDeleteContact,
  adminUpdateContact,
  adminUpdateRotaEntry,
  contactsOverview,
  demoContacts,
  listRules,
  seedDemoContacts,
} from "@/db/contacts";
import { demoSites } from "@/db/demo-scenario";
import { runMigrations } from "@/db/migrate";
import { auditLog, events, notificationRules, onCallEntries, sites } from "@/db/schema";
import { createUser } from "@/db/users";
import { contactInputSchema, rotaEntryInputSchema, ruleInputSchema } from "@/shared/contact-schema";
import { tempDir } from "./notify-fixtures";

const tmp = tempDir("airkeep-contacts-");
let n = 0;
let db: Db;
let actor: AdminActor;
let site: number;

beforeEach(() => {
  db = openDatabase(tmp.file(`contacts-${++n}.db`));
  runMigrations(db);
  const admin = createUser(db, { email: "root@example.org", name: "Root", role: "admin", passwordHash: "x", allSites: true, siteIds: [] });
  actor = { userId: admin.id, email: admin.email, ip: "127.0.0.1" };
  site = db.insert(sites).values({ name: "Heronfold Ridge Fire Station", code: "heronfold-ridge", timeZone: "Europe/Oslo", createdAt: 0 }).returning().get().id;
});
afterEach(() => db.$client.close());
afterAll(() => tmp.remove());

function refusal(fn: () => unknown): AdminRefusal {
  try {
    fn();
  } catch (e) {
    if (e instanceof AdminRefusal) return e;
    throw e;
  }
  throw new Error("expected a refusal");
}

const contactInput = (over: Record<string, unknown> = {}) => contactInputSchema.parse({ name: "Jonas Brekke", email: "Jonas@Airkeep.demo", userId: "", active: true, note: "", ...over });

describe("schemas", () => {
  it("validate contacts, rules and rota lines as the forms send them", () => {
    expect(contactInput()).toMatchObject({ email: "jonas@airkeep.demo", userId: null });
    expect(contactInputSchema.safeParse({ name: "", email: "nope", userId: "", active: true, note: "" }).success).toBe(false);
    const rule = ruleInputSchema.safeParse({ siteId: "", minPriority: "critical", target: "contact", contactId: "", mode: "chain", position: "10", escalateAfterMin: "", enabled: true });
    expect(rule.success).toBe(false);
    expect(Object.keys(z.flattenError(rule.error!).fieldErrors)).toEqual(["contactId"]);
    expect(ruleInputSchema.parse({ siteId: "", minPriority: "warning", target: "on-call", contactId: "", mode: "chain", position: "0", escalateAfterMin: "20", enabled: true })).toMatchObject({
      siteId: null,
      contactId: null,
      escalateAfterMin: 20,
    });
    const rota = rotaEntryInputSchema.safeParse({ siteId: "1", contactId: "2", position: "0", weekdays: [], startTime: "7:00", endTime: "24:00" });
    expect(rota.success).toBe(false);
    expect(new Set(Object.keys(z.flattenError(rota.error!).fieldErrors))).toEqual(new Set(["weekdays", "startTime", "endTime"]));
    expect(rotaEntryInputSchema.parse({ siteId: "1", contactId: "2", position: "0", weekdays: [5, 1, 1], startTime: "19:00", endTime: "07:00" }).weekdays).toEqual([1, 5]);
  });
});

describe("audited writes", () => {
  it("creates, updates and deletes a contact with its rules and rota lines, each in the audit log and event log", () => {
    const c = adminCreateContact(db, contactInput(), actor);
    expect(c.email).toBe("jonas@airkeep.demo");
    adminCreateRule(db, ruleInputSchema.parse({ siteId: "", minPriority: "critical", target: "contact", contactId: String(c.id), mode: "chain", position: "5", escalateAfterMin: "", enabled: true }), actor);
    adminCreateRotaEntry(db, rotaEntryInputSchema.parse({ siteId: String(site), contactId: String(c.id), position: "0", weekdays: [1, 2, 3, 4, 5, 6, 7], startTime: "17:00", endTime: "07:00" }), actor);
    const updated = adminUpdateContact(db, c.id, contactInput({ name: "Jonas B.", active: false }), actor);
    expect(updated).toMatchObject({ name: "Jonas B.", active: false, ruleCount: 1, rotaCount: 1 });

    adminDeleteContact(db, c.id, actor);
    expect(db.select({ n: count() }).from(notificationRules).get()!.n).toBe(0);
    expect(db.select({ n: count() }).from(onCallEntries).get()!.n).toBe(0);
    const audits = db.select().from(auditLog).all();
    expect(audits.map((a) => a.action)).toEqual(["contact.create", "notification_rule.create", "on_call.create", "contact.update", "contact.delete"]);
    expect(audits[3]!.details).toMatchObject({ before: { name: "Jonas Brekke", active: true }, after: { name: "Jonas B.", active: false } });
    expect(audits[4]!.details).toMatchObject({ rulesRemoved: 1, rotaLinesRemoved: 1 });
    expect(db.select().from(events).where(eq(events.kind, "config")).all()).toHaveLength(5);
  });

  it("refuses a duplicate e-mail and references that no longer exist, at the right field", () => {
    adminCreateContact(db, contactInput(), actor);
    const dup = refusal(() => adminCreateContact(db, contactInput({ name: "Other" }), actor));
    expect(dup.status).toBe(409);
    expect(dup.fieldErrors).toEqual({ email: ["Another contact already has this e-mail address"] });
    const missing = refusal(() =>
      adminCreateRotaEntry(db, rotaEntryInputSchema.parse({ siteId: "999", contactId: "1", position: "0", weekdays: [1], startTime: "08:00", endTime: "16:00" }), actor),
    );
    expect(missing.status).toBe(409);
    expect(refusal(() => adminUpdateRotaEntry(db, 12345, rotaEntryInputSchema.parse({ siteId: String(site), contactId: "1", position: "0", weekdays: [1], startTime: "08:00", endTime: "16:00" }), actor)).status).toBe(404);
    expect(db.select().from(auditLog).all().map((a) => a.action)).toEqual(["contact.create"]);
  });

  it("an on-call rule keeps no contact", () => {
    const c = adminCreateContact(db, contactInput(), actor);
    adminCreateRule(db, { siteId: site, minPriority: "warning", target: "on-call", contactId: c.id, mode: "chain", position: 0, escalateAfterMin: null, enabled: true }, actor);
    expect(listRules(db)[0]).toMatchObject({ target: "on-call", contactId: null, siteName: "Heronfold Ridge Fire Station" });
  });
});

describe("overview", () => {
  it("says who is on call now at each site, in the site's time", () => {
    const day = adminCreateContact(db, contactInput({ name: "Day", email: "day@airkeep.demo" }), actor);
    const night = adminCreateContact(db, contactInput({ name: "Night", email: "night@airkeep.demo" }), actor);
    const all = [1, 2, 3, 4, 5, 6, 7];
    adminCreateRotaEntry(db, { siteId: site, contactId: day.id, position: 0, weekdays: all, startTime: "07:00", endTime: "17:00" }, actor);
    adminCreateRotaEntry(db, { siteId: site, contactId: night.id, position: 0, weekdays: all, startTime: "17:00", endTime: "07:00" }, actor);
    // 15:59 UTC in January is 16:59 CET in Oslo; 16:00 UTC is 17:00 CET.
    const at = (iso: string) => contactsOverview(db, { now: Date.parse(iso), defaultEscalateAfterMin: 15 }).onCallNow[0]!.contacts.map((c) => c.name);
    expect(at("2025-01-15T15:59:00Z")).toEqual(["Day"]);
    expect(at("2025-01-15T16:00:00Z")).toEqual(["Night"]);
    // In July (CEST) the same wall time is an hour earlier in UTC.
    expect(at("2025-07-15T14:59:00Z")).toEqual(["Day"]);
    expect(at("2025-07-15T15:00:00Z")).toEqual(["Night"]);
  });
});

describe("demo contacts", () => {
  it("wait for the demo organisation, are seeded once with a rota for every demo site, and are never added back", () => {
    db.delete(sites).run();
    expect(seedDemoContacts(db)).toEqual({ contacts: 0, rules: 0, rota: 0 });
    for (const s of demoSites) db.insert(sites).values({ name: s.name, code: s.code, timeZone: s.timeZone, createdAt: 0 }).run();

    const first = seedDemoContacts(db);
    expect(first.contacts).toBe(demoContacts.length);
    expect(first.rules).toBeGreaterThan(0);
    expect(seedDemoContacts(db)).toEqual({ contacts: 0, rules: 0, rota: 0 });
    db.delete(notificationRules).run(); // an administrator's choice survives the next demo start
    expect(seedDemoContacts(db)).toEqual({ contacts: 0, rules: 0, rota: 0 });
    expect(db.select({ n: count() }).from(notificationRules).get()!.n).toBe(0);

    const overview = contactsOverview(db, { defaultEscalateAfterMin: 15 });
    expect(overview.contacts.every((c) => c.email.endsWith("@airkeep.demo"))).toBe(true);
    // Someone is on call at every demo site at every hour of a week.
    for (let h = 0; h < 7 * 24; h++) {
      const now = Date.UTC(2025, 5, 2) + h * 3_600_000 + 30 * 60_000;
      for (const on of contactsOverview(db, { now, defaultEscalateAfterMin: 15 }).onCallNow) {
        expect(on.contacts.length, `${on.siteName} at ${new Date(now).toISOString()}`).toBeGreaterThan(0);
      }
    }
  });
});
