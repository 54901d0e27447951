"use server";

import { headers } from "next/headers";
import { z } from "zod";
import { getDb } from "@/db/client";
import { runAction, type ActionResult } from "@/lib/api/action";
import { clientAddress } from "@/lib/web/request-facts";
import type { CurrentUser } from "@/lib/auth/current-user";
import {
  addServiceWindow as addWindow,
  correctServiceEntry,
  recordServiceLog,
  removeServiceTask as removeTask,
  resetServiceInterval as resetInterval,
  saveServiceLead as saveLead,
  saveServiceTask as saveTask,
  type LogResult,
  type ServiceActor,
} from "@/lib/service/log";
import {
  serviceLeadSchema,
  serviceLogCorrectionSchema,
  serviceLogInputSchema,
  serviceTaskCodeSchema,
  serviceTaskRemoveSchema,
  serviceTaskSaveSchema,
  serviceWindowInputSchema,
} from "@/shared/service-schema";

// Service actions: each parses with the shared schema, authorises with the permission table, and makes one call into
// lib/service/log.ts (which checks the site scope and audits). Attachments are uploaded afterwards, one file per
// request, to POST /api/attachments?ownerKind=service_log&ownerId=<entry id> (streamed; see lib/storage/).

async function actorOf(user: CurrentUser): Promise<ServiceActor> {
  return { id: user.id, name: user.name, email: user.email, siteIds: user.siteIds, ip: clientAddress(await headers()) };
}

/** { submissionId, compressorId, tasks: [code], doneAt, hourMeterH | null, parts, notes } */
export async function logService(input: unknown): Promise<ActionResult<LogResult>> {
  return runAction("service.log", serviceLogInputSchema, input, async (data, user) => recordServiceLog(getDb(), await actorOf(user), data));
}

const resetSchema = z.object({
  compressorId: z.number().int().positive(),
  code: serviceTaskCodeSchema,
  reason: z.string().trim().min(3, "Say why the interval is reset").max(300),
  submissionId: z.string().regex(/^[A-Za-z0-9_-]{8,64}$/),
});

/** { compressorId, code, reason, submissionId } */
export async function resetServiceInterval(input: unknown): Promise<ActionResult<LogResult>> {
  return runAction("service.reset", resetSchema, input, async (data, user) => resetInterval(getDb(), await actorOf(user), data));
}

/** { id, tasks, doneAt, hourMeterH, parts, notes, reason }: an administrator's correction, audited with before/after. */
export async function correctServiceLog(input: unknown): Promise<ActionResult<{ id: number }>> {
  return runAction("service.correct", serviceLogCorrectionSchema, input, async (data, user) => correctServiceEntry(getDb(), await actorOf(user), data));
}

/** { compressorId, startAt, endAt, reason }: counted as planned service by the monthly report. */
export async function addServiceWindow(input: unknown): Promise<ActionResult<{ id: number }>> {
  return runAction("service.log", serviceWindowInputSchema, input, async (data, user) => addWindow(getDb(), await actorOf(user), data));
}

/** { scopeType, scopeId, task: { code, name, everyHours, everyMonths, enabled, note } } */
export async function saveServiceTask(input: unknown): Promise<ActionResult<null>> {
  return runAction("service.plan", serviceTaskSaveSchema, input, async (data, user) => {
    saveTask(getDb(), await actorOf(user), data.scopeType, data.scopeId, data.task);
    return null;
  });
}

/** { scopeType, scopeId, code } */
export async function removeServiceTask(input: unknown): Promise<ActionResult<null>> {
  return runAction("service.plan", serviceTaskRemoveSchema, input, async (data, user) => {
    removeTask(getDb(), await actorOf(user), data.scopeType, data.scopeId, data.code);
    return null;
  });
}

/** { leadHours, leadDays } */
export async function saveServiceLead(input: unknown): Promise<ActionResult<null>> {
  return runAction("service.plan", serviceLeadSchema, input, async (data, user) => {
    saveLead(getDb(), await actorOf(user), data);
    return null;
  });
}
