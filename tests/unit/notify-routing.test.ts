import { describe, expect, it } from "vitest";
import { isStorm, nextInChain, priorityMatches, routeAlarm, type RuleForRouting } from "@/shared/notify-routing";

const MIN = 60_000;
let id = 0;
const rule = (r: Partial<RuleForRouting>): RuleForRouting => ({
  id: ++id,
  siteId: null,
  minPriority: "warning",
  target: "contact",
  contactId: null,
  mode: "chain",
  position: 0,
  escalateAfterMin: null,
  enabled: true,
  ...r,
});
const active = new Set([1, 2, 3, 4, 5, 6]);
const route = (rules: RuleForRouting[], priority: "critical" | "warning" | "advisory", onCall: number[] = [], siteId = 7) =>
  routeAlarm({ rules, siteId, priority, onCall, activeContactIds: active, defaultEscalateAfterMs: 15 * MIN });

describe("routing", () => {
  it("matches priority from the minimum upwards", () => {
    expect(priorityMatches("critical", "warning")).toBe(true);
    expect(priorityMatches("warning", "warning")).toBe(true);
    expect(priorityMatches("advisory", "warning")).toBe(false);
    expect(priorityMatches("critical", "critical")).toBe(true);
    expect(priorityMatches("warning", "critical")).toBe(false);
  });

  it("builds the chain in rule order, expanding on-call rules in rota order, each contact once", () => {
    const rules = [
      rule({ contactId: 3, position: 10, escalateAfterMin: 30 }),
      rule({ target: "on-call", position: 0 }),
      rule({ contactId: 1, position: 5 }), // already in the chain through the rota
      rule({ contactId: 4, position: 1, siteId: 8 }), // another site
      rule({ contactId: 5, position: 2, minPriority: "critical" }), // does not match a warning
      rule({ contactId: 6, position: 3, enabled: false }),
    ];
    const r = route(rules, "warning", [1, 2]);
    expect(r.chain.map((c) => c.contactId)).toEqual([1, 2, 3]);
    expect(r.chain.map((c) => c.escalateAfterMs)).toEqual([15 * MIN, 15 * MIN, 30 * MIN]);
    expect(route(rules, "critical", [1, 2]).chain.map((c) => c.contactId)).toEqual([1, 2, 5, 3]);
  });

  it("keeps copies apart from the chain, and a chain place wins over a copy", () => {
    const rules = [rule({ target: "on-call" }), rule({ contactId: 2, mode: "copy" }), rule({ contactId: 1, mode: "copy" })];
    const r = route(rules, "critical", [1]);
    expect(r.chain.map((c) => c.contactId)).toEqual([1]);
    expect(r.copies.map((c) => c.contactId)).toEqual([2]);
  });

  it("skips inactive contacts and an empty rota", () => {
    const rules = [rule({ target: "on-call" }), rule({ contactId: 99 }), rule({ contactId: 4 })];
    expect(route(rules, "warning", []).chain.map((c) => c.contactId)).toEqual([4]);
  });

  it("escalates to the first in the chain not yet told", () => {
    const r = route([rule({ contactId: 1 }), rule({ contactId: 2, position: 1 }), rule({ contactId: 3, position: 2 })], "warning");
    expect(nextInChain(r.chain, new Set([1]))?.contactId).toBe(2);
    expect(nextInChain(r.chain, new Set([1, 2, 3]))).toBeNull();
  });

  it("calls it a storm only above the threshold", () => {
    expect(isStorm(5, 5)).toBe(false);
    expect(isStorm(6, 5)).toBe(true);
  });
});
