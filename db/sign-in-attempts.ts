import { and, count, eq, gte, lt } from "drizzle-orm";
import type { Db } from "./client";
import { signInAttempts } from "./schema";

export type AttemptLimits = { since: number; maxPerAccount: number; maxPerAddress: number };

/**
 * Reserves one sign-in attempt for the account and address, in one IMMEDIATE transaction with the counts it checks,
 * so parallel tries (in this process or another) cannot all pass the limits. Returns the attempt's id, or null when
 * either limit is already reached. Attempts older than the window are pruned on the way.
 */
export function reserveSignInAttempt(
  db: Db,
  attempt: { account: string; address: string },
  limits: AttemptLimits,
  now = Date.now(),
): number | null {
  return db.transaction(
    (tx) => {
      const byAccount = tx
        .select({ n: count() })
        .from(signInAttempts)
        .where(and(eq(signInAttempts.account, attempt.account), gte(signInAttempts.ts, limits.since)))
        .get();
      const byAddress = tx
        .select({ n: count() })
        .from(signInAttempts)
        .where(and(eq(signInAttempts.address, attempt.address), gte(signInAttempts.ts, limits.since)))
        .get();
      if ((byAccount?.n ?? 0) >= limits.maxPerAccount || (byAddress?.n ?? 0) >= limits.maxPerAddress) return null;
      tx.delete(signInAttempts).where(lt(signInAttempts.ts, limits.since)).run();
      return tx.insert(signInAttempts).values({ ts: now, ...attempt }).returning({ id: signInAttempts.id }).get().id;
    },
    { behavior: "immediate" },
  );
}

/** A failed attempt keeps counting; a successful one no longer does. */
export function settleSignInAttempt(db: Db, id: number, succeeded: boolean): void {
  if (succeeded) db.delete(signInAttempts).where(eq(signInAttempts.id, id)).run();
  else db.update(signInAttempts).set({ pending: false }).where(eq(signInAttempts.id, id)).run();
}
