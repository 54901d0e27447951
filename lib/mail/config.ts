type Env = Record<string, string | undefined>;

// Mail settings from the environment, with the demo's defaults.

export type MailConfig = {
  /** Where mail goes. Unset SMTP_URL means the built-in SMTP fake on SMTP_HOST:SMTP_PORT. */
  smtpUrl: string;
  /** True when SMTP_URL was not given: lib/mail/main.ts starts the fake. */
  useFake: boolean;
  fakeHost: string;
  fakePort: number;
  /** The From header, e.g. "Airkeep <alarms@airkeep.demo>". */
  from: string;
  pollMs: number;
  retryBaseMs: number;
  retryMaxMs: number;
  /** MAIL_PROBE_S (2): while the server is unreachable, one queued message is tried this often ahead of its back-off. */
  probeMs: number;
  /** A message the server refuses outright (5xx) is given up after this many attempts; connection trouble never gives up. */
  maxRejections: number;
  /** A claim older than this belongs to a sender that died mid-send. */
  claimTimeoutMs: number;
  /** Connection, greeting and socket timeouts of one SMTP send (kept well below the claim timeout). */
  sendTimeoutMs: number;
};

function num(env: Env, name: string, fallback: number, min: number, max: number): number {
  const raw = env[name];
  if (raw === undefined || raw.trim() === "") return fallback;
  const n = Number(raw);
  if (!Number.isFinite(n) || n < min || n > max) throw new Error(`${name}=${raw} is not a number from ${min} to ${max}`);
  return n;
}

export function mailConfigFromEnv(env: Env = process.env): MailConfig {
  const fakeHost = env.SMTP_HOST?.trim() || "127.0.0.1";
  const fakePort = num(env, "SMTP_PORT", 2525, 0, 65535);
  const given = env.SMTP_URL?.trim();
  return {
    smtpUrl: given || `smtp://${fakeHost}:${fakePort}`,
    useFake: !given,
    fakeHost,
    fakePort,
    from: env.MAIL_FROM?.trim() || "Airkeep <alarms@airkeep.demo>",
    pollMs: num(env, "MAIL_POLL_MS", 1000, 50, 600_000),
    retryBaseMs: num(env, "MAIL_RETRY_BASE_S", 10, 0.01, 3600) * 1000,
    retryMaxMs: num(env, "MAIL_RETRY_MAX_S", 900, 0.01, 86_400) * 1000,
    probeMs: num(env, "MAIL_PROBE_S", 2, 0.05, 3600) * 1000,
    maxRejections: num(env, "MAIL_MAX_REJECTIONS", 5, 1, 1000),
    claimTimeoutMs: num(env, "MAIL_CLAIM_TIMEOUT_S", 120, 1, 86_400) * 1000,
    sendTimeoutMs: num(env, "MAIL_SEND_TIMEOUT_S", 30, 1, 3600) * 1000,
  };
}

/** The address part of a From header: "Airkeep <alarms@airkeep.demo>" → alarms@airkeep.demo. */
export function fromAddress(from: string): string {
  const m = /<([^>]+)>/.exec(from);
  return (m ? m[1]! : from).trim();
}

/** The domain Message-IDs are made in. */
export function messageIdDomain(from: string): string {
  const domain = fromAddress(from).split("@")[1]?.trim().toLowerCase();
  return domain && /^[a-z0-9.-]+$/.test(domain) ? domain : "airkeep.invalid";
}
