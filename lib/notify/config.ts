import { mailConfigFromEnv } from "@/lib/mail/config";

type Env = Record<string, string | undefined>;

// Notifier settings from the environment, with their defaults.

export type NotifyConfig = {
  /** ESCALATE_AFTER_MIN (15): wait for an acknowledgement before the next in the chain is told (a rule may override). */
  escalateAfterMs: number;
  /** DIGEST_THRESHOLD (5): more alarms than this at one site inside the window → one digest instead of single mails. */
  digestThreshold: number;
  /** DIGEST_WINDOW_MIN (10). */
  digestWindowMs: number;
  /** NOTIFY_LOOKBACK_MIN (1440): alarms raised longer ago than this are never notified for the first time. */
  lookbackMs: number;
  /** NOTIFY_POLL_MS (5000). */
  pollMs: number;
  /** NEXTAUTH_URL: the base of the links in the mails. */
  baseUrl: string;
  /** MAIL_FROM (for the Message-ID domain). */
  from: string;
};

function num(env: Env, name: string, fallback: number, min: number, max: number): number {
  const raw = env[name];
  if (raw === undefined || raw.trim() === "") return fallback;
  const n = Number(raw);
  if (!Number.isFinite(n) || n < min || n > max) throw new Error(`${name}=${raw} is not a number from ${min} to ${max}`);
  return n;
}

export function escalateAfterMinFromEnv(env: Env = process.env): number {
  return num(env, "ESCALATE_AFTER_MIN", 15, 0.1, 1440);
}

export function notifyConfigFromEnv(env: Env = process.env): NotifyConfig {
  return {
    escalateAfterMs: escalateAfterMinFromEnv(env) * 60_000,
    digestThreshold: Math.floor(num(env, "DIGEST_THRESHOLD", 5, 1, 1000)),
    digestWindowMs: num(env, "DIGEST_WINDOW_MIN", 10, 1, 1440) * 60_000,
    lookbackMs: num(env, "NOTIFY_LOOKBACK_MIN", 1440, 1, 60 * 24 * 30) * 60_000,
    pollMs: num(env, "NOTIFY_POLL_MS", 5000, 100, 600_000),
    baseUrl: (env.NEXTAUTH_URL?.trim() || "http://localhost:3000").replace(/\/+$/, ""),
    from: mailConfigFromEnv(env).from,
  };
}
