import { eq, inArray } from "drizzle-orm";
import type { Db } from "@/db/client";
import { alarms, compressors, compressorState, contacts, notificationRules, onCallEntries, sites, users } from "@/db/schema";
import type { Priority } from "@/shared/alarm-rules";
import { onCallAt, type RotaEntry } from "@/shared/notify-rota";
import { routeAlarm, type RuleForRouting, type Routing } from "@/shared/notify-routing";
import { alarmTitle } from "@/shared/alarm-text";
import type { NoticeAlarm } from "@/shared/notify-text";
import { defaultUnits, type UnitPreference } from "@/shared/units";

// What the notifier reads: contacts, rules and rota (the routing context) and alarms as a mail shows them.

export type ContactForMail = { id: number; name: string; email: string; active: boolean; units: UnitPreference };

export type RoutingContext = {
  contacts: Map<number, ContactForMail>;
  rules: RuleForRouting[];
  rota: Map<number, RotaEntry[]>;
  sites: Map<number, { id: number; name: string; timeZone: string }>;
};

export function loadRoutingContext(db: Db): RoutingContext {
  const contactRows = db
    .select({
      id: contacts.id,
      name: contacts.name,
      email: contacts.email,
      active: contacts.active,
      pressureUnit: users.pressureUnit,
      temperatureUnit: users.temperatureUnit,
      userDisabled: users.disabled,
    })
    .from(contacts)
    .leftJoin(users, eq(users.id, contacts.userId))
    .all();
  const contactMap = new Map<number, ContactForMail>();
  for (const c of contactRows) {
    contactMap.set(c.id, {
      id: c.id,
      name: c.name,
      email: c.email,
      // A contact whose account is disabled no longer receives site names, values and links.
      active: c.active && !c.userDisabled,
      units: { pressureUnit: c.pressureUnit ?? defaultUnits.pressureUnit, temperatureUnit: c.temperatureUnit ?? defaultUnits.temperatureUnit },
    });
  }
  const rules = db.select().from(notificationRules).all();
  const rota = new Map<number, RotaEntry[]>();
  for (const e of db.select().from(onCallEntries).all()) {
    rota.set(e.siteId, [...(rota.get(e.siteId) ?? []), e]);
  }
  const siteMap = new Map<number, { id: number; name: string; timeZone: string }>();
  for (const s of db.select({ id: sites.id, name: sites.name, timeZone: sites.timeZone }).from(sites).all()) siteMap.set(s.id, s);
  return { contacts: contactMap, rules, rota, sites: siteMap };
}

/** Contact ids on call at a site at `at`, in rota order. */
export function onCallContacts(ctx: RoutingContext, siteId: number, at: number): number[] {
  const site = ctx.sites.get(siteId);
  if (!site) return [];
  return onCallAt(ctx.rota.get(siteId) ?? [], at, site.timeZone).map((e) => e.contactId);
}

export function routingFor(ctx: RoutingContext, siteId: number, priority: Priority, at: number, defaultEscalateAfterMs: number): Routing {
  const active = new Set([...ctx.contacts.values()].filter((c) => c.active).map((c) => c.id));
  return routeAlarm({
    rules: ctx.rules,
    siteId,
    priority,
    onCall: onCallContacts(ctx, siteId, at),
    activeContactIds: active,
    defaultEscalateAfterMs,
  });
}

export type NoticeRow = NoticeAlarm & { siteId: number; compressorId: number; reAlarmedAt: number | null };

/** Alarms as the mails show them, by id. */
export function loadNoticeAlarms(db: Db, ids: readonly number[]): Map<number, NoticeRow> {
  const out = new Map<number, NoticeRow>();
  if (!ids.length) return out;
  const rows = db
    .select({
      a: alarms,
      compressorName: compressors.name,
      siteName: sites.name,
      timeZone: sites.timeZone,
      ackByName: users.name,
      receivedAt: compressorState.receivedAt,
      lastSeenAt: compressorState.lastSeenAt,
    })
    .from(alarms)
    .leftJoin(compressors, eq(compressors.id, alarms.compressorId))
    .leftJoin(sites, eq(sites.id, alarms.siteId))
    .leftJoin(users, eq(users.id, alarms.ackBy))
    .leftJoin(compressorState, eq(compressorState.compressorId, alarms.compressorId))
    .where(inArray(alarms.id, [...ids]))
    .all();
  for (const r of rows) {
    const a = r.a;
    out.set(a.id, {
      id: a.id,
      key: a.key,
      priority: a.priority,
      signal: a.signal,
      title: alarmTitle(a),
      compressorName: r.compressorName ?? `Compressor ${a.compressorId}`,
      siteName: r.siteName ?? `Site ${a.siteId}`,
      timeZone: r.timeZone ?? "UTC",
      state: a.state,
      active: a.active,
      raisedAt: a.raisedAt,
      clearedAt: a.clearedAt,
      value: a.value,
      limitValue: a.limitValue,
      tripCode: a.tripCode,
      chattering: a.chattering,
      ackAt: a.ackAt,
      ackByName: r.ackByName ?? null,
      ackComment: a.ackComment,
      lastDataAt: r.receivedAt ?? r.lastSeenAt ?? null,
      siteId: a.siteId,
      compressorId: a.compressorId,
      reAlarmedAt: a.reAlarmedAt,
    });
  }
  return out;
}
