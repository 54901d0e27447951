const minutes = (name: string, fallback: number) => {
  const v = Number(process.env[name]);
  return (Number.isFinite(v) && v > 0 ? v : fallback) * 60_000;
};

/** Session lifetimes and sign-in limits, each overridable by an environment variable. */
export function sessionPolicy() {
  return {
    idleMs: minutes("SESSION_IDLE_MINUTES", 8 * 60),
    absoluteMs: minutes("SESSION_MAX_MINUTES", 24 * 60),
    failureWindowMs: minutes("SIGNIN_WINDOW_MINUTES", 15),
    maxFailuresPerAccount: Number(process.env.SIGNIN_MAX_FAILURES_ACCOUNT ?? 5),
    maxFailuresPerAddress: Number(process.env.SIGNIN_MAX_FAILURES_ADDRESS ?? 20),
  };
}
