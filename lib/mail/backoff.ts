/**
 * Delay before retry number `attempt` (1 = the first retry): base·2^(attempt−1), capped, with up to `jitter` of it
 * added at random so many queued messages do not hammer a recovering server in step.
 */
export function retryDelayMs(attempt: number, baseMs: number, maxMs: number, jitter = 0.1, random: () => number = Math.random): number {
  const exp = Math.min(maxMs, baseMs * 2 ** Math.max(0, attempt - 1));
  return Math.round(Math.min(maxMs, exp * (1 + jitter * random())));
}
