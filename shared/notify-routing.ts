import { priorityRank, type Priority } from "./alarm-rules";

// Who is told about an alarm, and in which order. Pure: the notifier feeds it rows and the rota's answer.

export type RuleForRouting = {
  id: number;
  /** null = every site. */
  siteId: number | null;
  minPriority: Priority;
  target: "contact" | "on-call";
  contactId: number | null;
  mode: "chain" | "copy";
  position: number;
  escalateAfterMin: number | null;
  enabled: boolean;
};

export type Recipient = {
  contactId: number;
  /** The rule that brought this contact in. */
  ruleId: number;
  /** How long to wait for an acknowledgement before the next in the chain is told. */
  escalateAfterMs: number;
};

export type Routing = {
  /** The escalation order: the first is told at once, the next after each unacknowledged wait. */
  chain: Recipient[];
  /** Told at the first notice and of the all-clear; never escalated to. */
  copies: Recipient[];
};

/** An alarm of `priority` is at least as urgent as `minPriority` (critical > warning > advisory). */
export function priorityMatches(priority: Priority, minPriority: Priority): boolean {
  return priorityRank[priority] <= priorityRank[minPriority];
}

export function ruleMatches(rule: RuleForRouting, siteId: number, priority: Priority): boolean {
  return rule.enabled && (rule.siteId === null || rule.siteId === siteId) && priorityMatches(priority, rule.minPriority);
}

/**
 * Builds the chain and the copies for an alarm at `siteId` of `priority`.
 * Rules are taken in position order (then id); an "on-call" rule stands for the people on call at the site now, in rota
 * order. Inactive contacts are skipped; a contact appears once, at its first place (a chain place wins over a copy).
 */
export function routeAlarm(opts: {
  rules: readonly RuleForRouting[];
  siteId: number;
  priority: Priority;
  /** Contacts on call at the site now, in rota order. */
  onCall: readonly number[];
  activeContactIds: ReadonlySet<number>;
  defaultEscalateAfterMs: number;
}): Routing {
  const { siteId, priority, onCall, activeContactIds, defaultEscalateAfterMs } = opts;
  const rules = opts.rules.filter((r) => ruleMatches(r, siteId, priority)).sort((a, b) => a.position - b.position || a.id - b.id);
  const chain: Recipient[] = [];
  const copies: Recipient[] = [];
  const seen = new Set<number>();
  const add = (list: Recipient[], rule: RuleForRouting, contactId: number) => {
    if (seen.has(contactId) || !activeContactIds.has(contactId)) return;
    seen.add(contactId);
    const minutes = rule.escalateAfterMin ?? null;
    list.push({ contactId, ruleId: rule.id, escalateAfterMs: minutes !== null ? minutes * 60_000 : defaultEscalateAfterMs });
  };
  for (const mode of ["chain", "copy"] as const) {
    for (const rule of rules) {
      if (rule.mode !== mode) continue;
      const list = mode === "chain" ? chain : copies;
      if (rule.target === "on-call") for (const c of onCall) add(list, rule, c);
      else if (rule.contactId !== null) add(list, rule, rule.contactId);
    }
  }
  return { chain, copies };
}

/** The next in the chain not yet told, or null when everyone in it has been. */
export function nextInChain(chain: readonly Recipient[], told: ReadonlySet<number>): Recipient | null {
  return chain.find((r) => !told.has(r.contactId)) ?? null;
}

/** More than `threshold` alarms raised at one site inside the window: send one digest instead of one mail each. */
export function isStorm(alarmsInWindow: number, threshold: number): boolean {
  return alarmsInWindow > threshold;
}
