"use server";

import { acknowledgeAlarms, getAlarm, returnToService, setOutOfService, shelveAlarms, type AlarmActionResult } from "@/db/alarms";
import { getDb } from "@/db/client";
import { runAction } from "@/lib/api/action";
import type { CurrentUser } from "@/lib/auth/current-user";
import { acknowledgeSchema, outOfServiceSchema, returnToServiceSchema, shelveSchema, type AlarmDto } from "@/shared/alarm-schema";

// Operator actions on alarms. Each authorises, parses with the shared schema, and makes one call into db/alarms.ts,
// which checks the person's sites and the alarm lifecycle per alarm and writes the event-log entry. The answer says
// which alarms changed (with their new state, for the cache) and why any others were refused.
//
// Taking an alarm out of service, and returning it, are held to the shelving permission: both take an alarm off
// the list on purpose, and only roles trusted to shelve may do that.

export type AlarmActionOutcome = AlarmActionResult & { alarms: AlarmDto[] };

function outcome(result: AlarmActionResult): AlarmActionOutcome {
  const db = getDb();
  return { ...result, alarms: result.done.map((id) => getAlarm(db, id)).filter((a): a is AlarmDto => a !== null) };
}

const who = (user: CurrentUser) => ({ userId: user.id, actor: user.name, siteIds: user.siteIds });

/** { ids, comment } */
export async function acknowledgeAlarmsAction(input: unknown) {
  return runAction("alarms.acknowledge", acknowledgeSchema, input, ({ ids, comment }, user) =>
    outcome(acknowledgeAlarms(getDb(), { ...who(user), ids, comment })),
  );
}

/** { ids, comment, minutes } */
export async function shelveAlarmsAction(input: unknown) {
  return runAction("alarms.shelve", shelveSchema, input, ({ ids, comment, minutes }, user) =>
    outcome(shelveAlarms(getDb(), { ...who(user), ids, comment, minutes })),
  );
}

/** { id, reason } */
export async function outOfServiceAction(input: unknown) {
  return runAction("alarms.shelve", outOfServiceSchema, input, ({ id, reason }, user) =>
    outcome(setOutOfService(getDb(), { ...who(user), id, reason })),
  );
}

/** { id, comment } */
export async function returnToServiceAction(input: unknown) {
  return runAction("alarms.shelve", returnToServiceSchema, input, ({ id, comment }, user) =>
    outcome(returnToService(getDb(), { ...who(user), id, comment })),
  );
}
