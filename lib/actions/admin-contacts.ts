"use server";

import {
  adminCreateContact,
  adminCreateRotaEntry,
  adminCreateRule,
  adminDeleteContact,
  adminDeleteRotaEntry,
  adminDeleteRule,
  adminUpdateContact,
  adminUpdateRotaEntry,
  adminUpdateRule,
  getContact,
} from "@/db/contacts";
import { getDb } from "@/db/client";
import { ActionFailure, runAction } from "@/lib/api/action";
import { mailConfigFromEnv } from "@/lib/mail/config";
import { enqueueMail } from "@/lib/mail/outbox";
import {
  contactInputSchema,
  contactUpdateSchema,
  idSchema,
  rotaEntryInputSchema,
  rotaEntryUpdateSchema,
  ruleInputSchema,
  ruleUpdateSchema,
  testMailSchema,
} from "@/shared/contact-schema";
import { composeTestMail } from "@/shared/notify-text";
import { defaultUnits } from "@/shared/units";
import { actorOf, asFailures } from "./admin-support";

/** { name, email, userId, active, note } */
export async function createContact(input: unknown) {
  return runAction("admin.mail", contactInputSchema, input, async (data, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminCreateContact(getDb(), data, actor));
  });
}

/** { id, name, email, userId, active, note } */
export async function updateContact(input: unknown) {
  return runAction("admin.mail", contactUpdateSchema, input, async ({ id, ...data }, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminUpdateContact(getDb(), id, data, actor));
  });
}

/** { id } — also removes the contact's rules and rota lines. */
export async function deleteContact(input: unknown) {
  return runAction("admin.mail", idSchema, input, async ({ id }, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminDeleteContact(getDb(), id, actor));
  });
}

/** { siteId|null, minPriority, target, contactId|null, mode, position, escalateAfterMin|null, enabled } */
export async function createRule(input: unknown) {
  return runAction("admin.mail", ruleInputSchema, input, async (data, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminCreateRule(getDb(), data, actor));
  });
}

export async function updateRule(input: unknown) {
  return runAction("admin.mail", ruleUpdateSchema, input, async ({ id, ...data }, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminUpdateRule(getDb(), id, data, actor));
  });
}

export async function deleteRule(input: unknown) {
  return runAction("admin.mail", idSchema, input, async ({ id }, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminDeleteRule(getDb(), id, actor));
  });
}

/** { siteId, contactId, position, weekdays: number[] (1 = Monday), startTime "HH:MM", endTime "HH:MM" } */
export async function createRotaEntry(input: unknown) {
  return runAction("admin.mail", rotaEntryInputSchema, input, async (data, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminCreateRotaEntry(getDb(), data, actor));
  });
}

export async function updateRotaEntry(input: unknown) {
  return runAction("admin.mail", rotaEntryUpdateSchema, input, async ({ id, ...data }, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminUpdateRotaEntry(getDb(), id, data, actor));
  });
}

export async function deleteRotaEntry(input: unknown) {
  return runAction("admin.mail", idSchema, input, async ({ id }, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminDeleteRotaEntry(getDb(), id, actor));
  });
}

/** { contactId } → queues a test message; the mail process sends it within a second or two. */
export async function sendTestMail(input: unknown) {
  return runAction("admin.mail", testMailSchema, input, async ({ contactId }, user) => {
    const db = getDb();
    const contact = getContact(db, contactId);
    if (!contact) throw new ActionFailure(404, "This contact no longer exists.");
    const now = Date.now();
    const mail = composeTestMail(
      { now, baseUrl: process.env.NEXTAUTH_URL ?? "http://localhost:3000", units: defaultUnits, recipientName: contact.name },
      user.name || user.email,
    );
    const queued = enqueueMail(
      db,
      { key: `test:${contactId}:${now}`, kind: "test", contactId, to: { name: contact.name, address: contact.email }, ...mail },
      { from: mailConfigFromEnv().from, now, actor: user.email },
    );
    return { outboxId: queued.id, to: contact.email };
  });
}
