/**
 * Condition alarms: alarms about a state of affairs rather than a reading (a service task overdue, an air test failed),
 * raised and cleared through db/alarm-conditions.ts along the same ISA-18.2 lifecycle as limit alarms. Their key is
 * "cond:<family>:<subject>"; each family names its title here, where screens, e-mails and the event log read it.
 */
import { AIR_ALARM_FAMILY, airAlarmTitles, isAirAlarmKind } from "./air-quality-alarms";

export const CONDITION_KEY_PREFIX = "cond:";

type Family = { title: (subject: string) => string };

const words = (subject: string) => subject.replace(/[-_]+/g, " ");

export const conditionFamilies: Record<string, Family> = {
  "service-due": { title: (s) => `Service due: ${words(s)}` },
  "service-overdue": { title: (s) => `Service overdue: ${words(s)}` },
  "delivery-low": { title: () => "Delivery below rated" },
  [AIR_ALARM_FAMILY]: { title: (s) => (isAirAlarmKind(s) ? airAlarmTitles[s] : `Air quality: ${words(s)}`) },
};

const FAMILY_RE = /^[a-z][a-z0-9-]{0,39}$/;
const SUBJECT_RE = /^[a-z0-9][a-z0-9_-]{0,79}$/;

export function conditionKey(family: string, subject: string): string {
  if (!FAMILY_RE.test(family) || !SUBJECT_RE.test(subject)) throw new Error(`bad condition alarm key ${family}:${subject}`);
  return `${CONDITION_KEY_PREFIX}${family}:${subject}`;
}

export function parseConditionKey(key: string): { family: string; subject: string } | null {
  if (!key.startsWith(CONDITION_KEY_PREFIX)) return null;
  const [family, subject, extra] = key.slice(CONDITION_KEY_PREFIX.length).split(":");
  if (extra !== undefined || !family || !subject) return null;
  return { family, subject };
}

export function isConditionKey(key: string): boolean {
  return key.startsWith(CONDITION_KEY_PREFIX);
}

/** "Service overdue: oil change"; null for keys that are not condition alarms. */
export function conditionTitle(key: string): string | null {
  const c = parseConditionKey(key);
  if (!c) return null;
  const family = conditionFamilies[c.family];
  return family ? family.title(c.subject) : `${words(c.family)}: ${words(c.subject)}`;
}
