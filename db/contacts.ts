import { asc, count, eq } from "drizzle-orm";
import type {
  ContactDto,
  ContactInput,
  ContactsOverview,
  OnCallNowDto,
  RotaEntryDto,
  RotaEntryInput,
  RuleDto,
  RuleInput,
} from "@/shared/contact-schema";
import { onCallAt } from "@/shared/notify-rota";
import { AdminRefusal, constraintViolation, type AdminActor, type FieldErrors } from "./admin";
import { writeAudit } from "./audit";
import type { Db } from "./client";
import { demoEmail, demoSites } from "./demo-scenario";
import { contacts, notificationRules, onCallEntries, settings, sites, users } from "./schema";

// Contacts, notification rules and on-call rota: reads for the admin screens and audited writes. Each write runs in
// one transaction with its audit row.

// ---- Reads ------------------------------------------------------------------------------------------

export function listContacts(db: Db): ContactDto[] {
  const ruleCounts = new Map<number, number>();
  for (const r of db.select({ id: notificationRules.contactId, n: count() }).from(notificationRules).groupBy(notificationRules.contactId).all())
    if (r.id !== null) ruleCounts.set(r.id, r.n);
  const rotaCounts = new Map<number, number>();
  for (const r of db.select({ id: onCallEntries.contactId, n: count() }).from(onCallEntries).groupBy(onCallEntries.contactId).all())
    rotaCounts.set(r.id, r.n);
  return db
    .select({
      id: contacts.id,
      name: contacts.name,
      email: contacts.email,
      userId: contacts.userId,
      userName: users.name,
      active: contacts.active,
      note: contacts.note,
    })
    .from(contacts)
    .leftJoin(users, eq(users.id, contacts.userId))
    .orderBy(asc(contacts.name), asc(contacts.id))
    .all()
    .map((c) => ({ ...c, userName: c.userName ?? null, ruleCount: ruleCounts.get(c.id) ?? 0, rotaCount: rotaCounts.get(c.id) ?? 0 }));
}

export function getContact(db: Db, id: number): ContactDto | null {
  return listContacts(db).find((c) => c.id === id) ?? null;
}

export function listRules(db: Db): RuleDto[] {
  return db
    .select({
      id: notificationRules.id,
      siteId: notificationRules.siteId,
      siteName: sites.name,
      minPriority: notificationRules.minPriority,
      target: notificationRules.target,
      contactId: notificationRules.contactId,
      contactName: contacts.name,
      mode: notificationRules.mode,
      position: notificationRules.position,
      escalateAfterMin: notificationRules.escalateAfterMin,
      enabled: notificationRules.enabled,
    })
    .from(notificationRules)
    .leftJoin(sites, eq(sites.id, notificationRules.siteId))
    .leftJoin(contacts, eq(contacts.id, notificationRules.contactId))
    .orderBy(asc(notificationRules.position), asc(notificationRules.id))
    .all()
    .map((r) => ({ ...r, siteName: r.siteName ?? null, contactName: r.contactName ?? null }));
}

export function listRota(db: Db, now = Date.now()): RotaEntryDto[] {
  const rows = db
    .select({
      id: onCallEntries.id,
      siteId: onCallEntries.siteId,
      siteName: sites.name,
      timeZone: sites.timeZone,
      contactId: onCallEntries.contactId,
      contactName: contacts.name,
      contactActive: contacts.active,
      position: onCallEntries.position,
      weekdays: onCallEntries.weekdays,
      startTime: onCallEntries.startTime,
      endTime: onCallEntries.endTime,
    })
    .from(onCallEntries)
    .innerJoin(sites, eq(sites.id, onCallEntries.siteId))
    .innerJoin(contacts, eq(contacts.id, onCallEntries.contactId))
    .orderBy(asc(sites.name), asc(onCallEntries.position), asc(onCallEntries.id))
    .all();
  const onNow = new Set<number>();
  const bySite = new Map<number, typeof rows>();
  for (const r of rows) bySite.set(r.siteId, [...(bySite.get(r.siteId) ?? []), r]);
  for (const list of bySite.values()) for (const e of onCallAt(list, now, list[0]!.timeZone)) onNow.add(e.id);
  return rows.map((r) => ({ ...r, onCallNow: onNow.has(r.id) }));
}

export function contactsOverview(db: Db, opts: { now?: number; defaultEscalateAfterMin: number }): ContactsOverview & {
  sites: { id: number; name: string; timeZone: string }[];
  users: { id: number; name: string; email: string }[];
} {
  const now = opts.now ?? Date.now();
  const rota = listRota(db, now);
  const siteList = db.select({ id: sites.id, name: sites.name, timeZone: sites.timeZone }).from(sites).orderBy(asc(sites.name)).all();
  const onCallNow: OnCallNowDto[] = siteList.map((s) => ({
    siteId: s.id,
    siteName: s.name,
    timeZone: s.timeZone,
    contacts: rota
      .filter((e) => e.siteId === s.id && e.onCallNow && e.contactActive)
      .map((e) => ({ id: e.contactId, name: e.contactName })),
  }));
  return {
    contacts: listContacts(db),
    rules: listRules(db),
    rota,
    onCallNow,
    defaultEscalateAfterMin: opts.defaultEscalateAfterMin,
    at: now,
    sites: siteList,
    users: db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(eq(users.disabled, false)).orderBy(asc(users.name)).all(),
  };
}

// ---- Writes -----------------------------------------------------------------------------------------

function guarded<T>(write: () => T, onMissingReference: FieldErrors): T {
  try {
    return write();
  } catch (e) {
    if (e instanceof AdminRefusal) throw e;
    const v = constraintViolation(e);
    if (v?.kind === "unique" && v.columns.includes("contacts.email")) {
      throw new AdminRefusal(409, "That value is already in use.", { email: ["Another contact already has this e-mail address"] });
    }
    if (v?.kind === "foreignKey") {
      throw new AdminRefusal(409, "Something this refers to no longer exists. Reload and try again.", onMissingReference);
    }
    throw e;
  }
}

function audit(db: Db, actor: AdminActor, now: number, entry: Omit<Parameters<typeof writeAudit>[1], "actor" | "actorUserId" | "ip">) {
  writeAudit(db, { ...entry, actorUserId: actor.userId, actor: actor.email, ip: actor.ip ?? "" }, now);
}

const contactSnapshot = (c: ContactDto) => ({ name: c.name, email: c.email, userId: c.userId, active: c.active, note: c.note });

export function adminCreateContact(db: Db, input: ContactInput, actor: AdminActor, now = Date.now()): ContactDto {
  return guarded(
    () =>
      db.transaction(() => {
        const { id } = db
          .insert(contacts)
          .values({ ...input, createdAt: now, updatedAt: now })
          .returning({ id: contacts.id })
          .get();
        const after = getContact(db, id)!;
        audit(db, actor, now, { action: "contact.create", targetType: "contact", targetId: id, details: { label: after.name, after: contactSnapshot(after) } });
        return after;
      }, { behavior: "immediate" }),
    { userId: ["This account no longer exists"] },
  );
}

export function adminUpdateContact(db: Db, id: number, input: ContactInput, actor: AdminActor, now = Date.now()): ContactDto {
  return guarded(
    () =>
      db.transaction(() => {
        const before = getContact(db, id);
        if (!before) throw new AdminRefusal(404, "This contact no longer exists.");
        db.update(contacts)
          .set({ ...input, updatedAt: now })
          .where(eq(contacts.id, id))
          .run();
        const after = getContact(db, id)!;
        audit(db, actor, now, {
          action: "contact.update",
          targetType: "contact",
          targetId: id,
          details: { label: after.name, before: contactSnapshot(before), after: contactSnapshot(after) },
        });
        return after;
      }, { behavior: "immediate" }),
    { userId: ["This account no longer exists"] },
  );
}

/** Deletes the contact together with its rules and rota lines (said in the audit row). */
export function adminDeleteContact(db: Db, id: number, actor: AdminActor, now = Date.now()): { id: number } {
  return db.transaction(() => {
    const before = getContact(db, id);
    if (!before) throw new AdminRefusal(404, "This contact no longer exists.");
    db.delete(contacts).where(eq(contacts.id, id)).run();
    audit(db, actor, now, {
      action: "contact.delete",
      targetType: "contact",
      targetId: id,
      details: { label: before.name, before: contactSnapshot(before), rulesRemoved: before.ruleCount, rotaLinesRemoved: before.rotaCount },
    });
    return { id };
  }, { behavior: "immediate" });
}

function ruleValues(input: RuleInput) {
  return { ...input, contactId: input.target === "contact" ? input.contactId : null };
}

const ruleSnapshot = (r: RuleDto) => ({
  siteId: r.siteId,
  minPriority: r.minPriority,
  target: r.target,
  contactId: r.contactId,
  mode: r.mode,
  position: r.position,
  escalateAfterMin: r.escalateAfterMin,
  enabled: r.enabled,
});

function getRule(db: Db, id: number): RuleDto | null {
  return listRules(db).find((r) => r.id === id) ?? null;
}

const ruleLabel = (r: RuleDto) =>
  `${r.siteName ?? "every site"}, ${r.minPriority} and above → ${r.target === "on-call" ? "on call" : (r.contactName ?? "?")}`;

const ruleRefs: FieldErrors = { contactId: ["This contact no longer exists"], siteId: ["This site no longer exists"] };

export function adminCreateRule(db: Db, input: RuleInput, actor: AdminActor, now = Date.now()): RuleDto {
  return guarded(
    () =>
      db.transaction(() => {
        const { id } = db
          .insert(notificationRules)
          .values({ ...ruleValues(input), createdAt: now, updatedAt: now })
          .returning({ id: notificationRules.id })
          .get();
        const after = getRule(db, id)!;
        audit(db, actor, now, {
          action: "notification_rule.create",
          targetType: "notification_rule",
          targetId: id,
          siteId: after.siteId,
          details: { label: ruleLabel(after), after: ruleSnapshot(after) },
        });
        return after;
      }, { behavior: "immediate" }),
    ruleRefs,
  );
}

export function adminUpdateRule(db: Db, id: number, input: RuleInput, actor: AdminActor, now = Date.now()): RuleDto {
  return guarded(
    () =>
      db.transaction(() => {
        const before = getRule(db, id);
        if (!before) throw new AdminRefusal(404, "This rule no longer exists.");
        db.update(notificationRules)
          .set({ ...ruleValues(input), updatedAt: now })
          .where(eq(notificationRules.id, id))
          .run();
        const after = getRule(db, id)!;
        audit(db, actor, now, {
          action: "notification_rule.update",
          targetType: "notification_rule",
          targetId: id,
          siteId: after.siteId,
          details: { label: ruleLabel(after), before: ruleSnapshot(before), after: ruleSnapshot(after) },
        });
        return after;
      }, { behavior: "immediate" }),
    ruleRefs,
  );
}

export function adminDeleteRule(db: Db, id: number, actor: AdminActor, now = Date.now()): { id: number } {
  return db.transaction(() => {
    const before = getRule(db, id);
    if (!before) throw new AdminRefusal(404, "This rule no longer exists.");
    db.delete(notificationRules).where(eq(notificationRules.id, id)).run();
    audit(db, actor, now, {
      action: "notification_rule.delete",
      targetType: "notification_rule",
      targetId: id,
      siteId: before.siteId,
      details: { label: ruleLabel(before), before: ruleSnapshot(before) },
    });
    return { id };
  }, { behavior: "immediate" });
}

const rotaSnapshot = (e: RotaEntryDto) => ({
  siteId: e.siteId,
  contactId: e.contactId,
  position: e.position,
  weekdays: e.weekdays,
  startTime: e.startTime,
  endTime: e.endTime,
});

function getRotaEntry(db: Db, id: number, now: number): RotaEntryDto | null {
  return listRota(db, now).find((e) => e.id === id) ?? null;
}

const rotaLabel = (e: RotaEntryDto) => `${e.contactName} at ${e.siteName}`;
const rotaRefs: FieldErrors = { contactId: ["This contact no longer exists"], siteId: ["This site no longer exists"] };

export function adminCreateRotaEntry(db: Db, input: RotaEntryInput, actor: AdminActor, now = Date.now()): RotaEntryDto {
  return guarded(
    () =>
      db.transaction(() => {
        const { id } = db
          .insert(onCallEntries)
          .values({ ...input, createdAt: now, updatedAt: now })
          .returning({ id: onCallEntries.id })
          .get();
        const after = getRotaEntry(db, id, now)!;
        audit(db, actor, now, {
          action: "on_call.create",
          targetType: "on_call_entry",
          targetId: id,
          siteId: after.siteId,
          details: { label: rotaLabel(after), after: rotaSnapshot(after) },
        });
        return after;
      }, { behavior: "immediate" }),
    rotaRefs,
  );
}

export function adminUpdateRotaEntry(db: Db, id: number, input: RotaEntryInput, actor: AdminActor, now = Date.now()): RotaEntryDto {
  return guarded(
    () =>
      db.transaction(() => {
        const before = getRotaEntry(db, id, now);
        if (!before) throw new AdminRefusal(404, "This rota line no longer exists.");
        db.update(onCallEntries)
          .set({ ...input, updatedAt: now })
          .where(eq(onCallEntries.id, id))
          .run();
        const after = getRotaEntry(db, id, now)!;
        audit(db, actor, now, {
          action: "on_call.update",
          targetType: "on_call_entry",
          targetId: id,
          siteId: after.siteId,
          details: { label: rotaLabel(after), before: rotaSnapshot(before), after: rotaSnapshot(after) },
        });
        return after;
      }, { behavior: "immediate" }),
    rotaRefs,
  );
}

export function adminDeleteRotaEntry(db: Db, id: number, actor: AdminActor, now = Date.now()): { id: number } {
  return db.transaction(() => {
    const before = getRotaEntry(db, id, now);
    if (!before) throw new AdminRefusal(404, "This rota line no longer exists.");
    db.delete(onCallEntries).where(eq(onCallEntries.id, id)).run();
    audit(db, actor, now, {
      action: "on_call.delete",
      targetType: "on_call_entry",
      targetId: id,
      siteId: before.siteId,
      details: { label: rotaLabel(before), before: rotaSnapshot(before) },
    });
    return { id };
  }, { behavior: "immediate" });
}

// ---- Demo -------------------------------------------------------------------------------------------

type DemoSiteCode = (typeof demoSites)[number]["code"];

/** Invented people of the demo organisation; some are also demo accounts (by role). */
export const demoContacts: { name: string; email: string; role?: "supervisor" | "technician" | "engineer" | "manager"; note?: string }[] = [
  { name: "Tomasz Wren", email: "tomasz.wren@airkeep.demo", role: "technician", note: "Marrow Bay day technician" },
  { name: "Priya Halloran", email: "priya.halloran@airkeep.demo", note: "Marrow Bay night cover" },
  { name: "Callum Oduya", email: "callum.oduya@airkeep.demo", note: "Marrow Bay weekend days" },
  { name: "Jonas Brekke", email: "jonas.brekke@airkeep.demo", note: "Heronfold Ridge day technician" },
  { name: "Signe Marvik", email: "signe.marvik@airkeep.demo", note: "Heronfold Ridge nights" },
  { name: "Elin Haugen", email: "elin.haugen@airkeep.demo", role: "engineer", note: "Heronfold Ridge weekend days" },
  { name: "Luca Zammit", email: "luca.zammit@airkeep.demo", note: "Cobalt Reef fill station lead" },
  { name: "Nadia Borg", email: "nadia.borg@airkeep.demo", note: "Cobalt Reef out of hours" },
  { name: "Sam Okafor", email: "sam.okafor@airkeep.demo", role: "supervisor", note: "Group shift supervisor" },
  { name: "Maya Castell", email: "maya.castell@airkeep.demo", role: "manager", note: "Duty manager, last in the chain" },
  { name: "Marrow Bay watch room", email: "watchroom.marrowbay@airkeep.demo", note: "Shared inbox; copied on critical alarms" },
];

const demoRota: { site: DemoSiteCode; email: string; position: number; weekdays: number[]; startTime: string; endTime: string }[] = [
  { site: "marrow-bay", email: "tomasz.wren@airkeep.demo", position: 0, weekdays: [1, 2, 3, 4, 5], startTime: "07:00", endTime: "19:00" },
  { site: "marrow-bay", email: "callum.oduya@airkeep.demo", position: 0, weekdays: [6, 7], startTime: "07:00", endTime: "19:00" },
  { site: "marrow-bay", email: "priya.halloran@airkeep.demo", position: 0, weekdays: [1, 2, 3, 4, 5, 6, 7], startTime: "19:00", endTime: "07:00" },
  { site: "heronfold-ridge", email: "jonas.brekke@airkeep.demo", position: 0, weekdays: [1, 2, 3, 4, 5], startTime: "07:00", endTime: "17:00" },
  { site: "heronfold-ridge", email: "elin.haugen@airkeep.demo", position: 0, weekdays: [6, 7], startTime: "07:00", endTime: "17:00" },
  { site: "heronfold-ridge", email: "signe.marvik@airkeep.demo", position: 0, weekdays: [1, 2, 3, 4, 5, 6, 7], startTime: "17:00", endTime: "07:00" },
  { site: "cobalt-reef", email: "luca.zammit@airkeep.demo", position: 0, weekdays: [2, 3, 4, 5, 6, 7], startTime: "08:00", endTime: "18:00" },
  { site: "cobalt-reef", email: "nadia.borg@airkeep.demo", position: 0, weekdays: [1, 2, 3, 4, 5, 6, 7], startTime: "18:00", endTime: "08:00" },
  { site: "cobalt-reef", email: "nadia.borg@airkeep.demo", position: 1, weekdays: [1], startTime: "08:00", endTime: "18:00" },
];

const demoRules: {
  site: DemoSiteCode | null;
  minPriority: "critical" | "warning" | "advisory";
  email: string | null;
  mode: "chain" | "copy";
  position: number;
  escalateAfterMin: number | null;
}[] = [
  { site: null, minPriority: "warning", email: null, mode: "chain", position: 0, escalateAfterMin: null },
  { site: null, minPriority: "critical", email: "sam.okafor@airkeep.demo", mode: "chain", position: 10, escalateAfterMin: null },
  { site: null, minPriority: "critical", email: "maya.castell@airkeep.demo", mode: "chain", position: 20, escalateAfterMin: 30 },
  { site: "marrow-bay", minPriority: "critical", email: "watchroom.marrowbay@airkeep.demo", mode: "copy", position: 0, escalateAfterMin: null },
];

const DEMO_MARKER = "demo.contacts_seeded";

/**
 * Adds the demo's contacts, notification rules and a rota per demo site, once: a marker in `settings` keeps a second
 * run (every demo start) from adding back what an administrator has since removed.
 */
export function seedDemoContacts(db: Db, now = Date.now()): { contacts: number; rules: number; rota: number } {
  const created = { contacts: 0, rules: 0, rota: 0 };
  db.transaction(() => {
    if (db.select().from(settings).where(eq(settings.key, DEMO_MARKER)).get()) return;
    const siteIds = new Map<string, number>();
    for (const s of demoSites) {
      const row = db.select({ id: sites.id }).from(sites).where(eq(sites.code, s.code)).get();
      if (row) siteIds.set(s.code, row.id);
    }
    if (siteIds.size === 0) return; // the demo organisation is not seeded yet: try again next time
    const contactIds = new Map<string, number>();
    for (const c of demoContacts) {
      let row = db.select({ id: contacts.id }).from(contacts).where(eq(contacts.email, c.email)).get();
      if (!row) {
        const userId = c.role ? (db.select({ id: users.id }).from(users).where(eq(users.email, demoEmail(c.role))).get()?.id ?? null) : null;
        row = db
          .insert(contacts)
          .values({ name: c.name, email: c.email, userId, active: true, note: c.note ?? "", createdAt: now, updatedAt: now })
          .returning({ id: contacts.id })
          .get();
        created.contacts++;
      }
      contactIds.set(c.email, row.id);
    }
    for (const r of demoRules) {
      const siteId = r.site ? siteIds.get(r.site) : null;
      if (siteId === undefined) continue;
      db.insert(notificationRules)
        .values({
          siteId,
          minPriority: r.minPriority,
          target: r.email ? "contact" : "on-call",
          contactId: r.email ? contactIds.get(r.email)! : null,
          mode: r.mode,
          position: r.position,
          escalateAfterMin: r.escalateAfterMin,
          enabled: true,
          createdAt: now,
          updatedAt: now,
        })
        .run();
      created.rules++;
    }
    for (const e of demoRota) {
      const siteId = siteIds.get(e.site);
      if (siteId === undefined) continue;
      db.insert(onCallEntries)
        .values({
          siteId,
          contactId: contactIds.get(e.email)!,
          position: e.position,
          weekdays: e.weekdays,
          startTime: e.startTime,
          endTime: e.endTime,
          createdAt: now,
          updatedAt: now,
        })
        .run();
      created.rota++;
    }
    db.insert(settings).values({ key: DEMO_MARKER, value: String(now), updatedAt: now }).run();
  }, { behavior: "immediate" });
  return created;
}
