import type { Db } from "@/db/client";

export type AuditEvent = {
  action: string;
  actor: string;
  ip: string;
  targetType?: string | null;
  targetId?: string | null;
  siteId?: number | null;
  details?: Record<string, unknown>;
};

export type AuditLimiter = {
  record(e: AuditEvent): void;
  /** Writes summaries of suppressed repeats whose window has ended. */
  sweep(now?: number): void;
  close(): void;
  readonly rowsWritten: number;
  readonly suppressed: number;
};

type KeyState = { windowStart: number; suppressed: number; last: AuditEvent };

/**
 * Writes refusals to audit_log without letting a flood fill the disk: one row per (action, actor, address)
 * per window, the repeats counted into the next row, and a global ceiling of rows per window.
 */
export function createAuditLimiter(
  db: Db,
  opts: { windowMs?: number; maxRowsPerWindow?: number; maxKeys?: number; now?: () => number } = {},
): AuditLimiter {
  const windowMs = opts.windowMs ?? 60_000;
  const maxRows = opts.maxRowsPerWindow ?? 120;
  const maxKeys = opts.maxKeys ?? 10_000;
  const clock = opts.now ?? Date.now;
  const insert = db.$client.prepare(
    `INSERT INTO audit_log (ts, actor_user_id, actor, action, target_type, target_id, site_id, ip, details)
     VALUES (?, NULL, ?, ?, ?, ?, ?, ?, ?)`,
  );
  const keys = new Map<string, KeyState>();
  let globalWindowStart = clock();
  let globalRows = 0;
  let globalSuppressed = 0;
  let rowsWritten = 0;
  let suppressedTotal = 0;

  const write = (now: number, e: AuditEvent, extra?: Record<string, unknown>): void => {
    try {
      const details = extra ? { ...e.details, ...extra } : e.details;
      insert.run(
        now,
        e.actor,
        e.action,
        e.targetType ?? null,
        e.targetId ?? null,
        e.siteId ?? null,
        e.ip,
        details ? JSON.stringify(details) : null,
      );
      rowsWritten++;
    } catch (err) {
      console.error("audit write failed:", (err as Error).message);
    }
  };

  const rollGlobal = (now: number): void => {
    if (now - globalWindowStart < windowMs) return;
    if (globalSuppressed > 0) {
      write(now, { action: "mqtt.audit_suppressed", actor: "broker", ip: "" }, { suppressed: globalSuppressed, windowMs });
    }
    globalWindowStart = now;
    globalRows = 0;
    globalSuppressed = 0;
  };

  const budgeted = (now: number, e: AuditEvent, extra?: Record<string, unknown>): void => {
    rollGlobal(now);
    if (globalRows >= maxRows) {
      globalSuppressed++;
      suppressedTotal++;
      return;
    }
    globalRows++;
    write(now, e, extra);
  };

  const sweep = (now = clock(), force = false): void => {
    for (const [k, s] of keys) {
      if (!force && now - s.windowStart < windowMs) continue;
      if (s.suppressed > 0) budgeted(now, s.last, { repeats: s.suppressed, windowMs });
      keys.delete(k);
    }
    if (force && globalSuppressed > 0) globalWindowStart = now - windowMs;
    rollGlobal(now);
  };
  const timer = setInterval(() => sweep(), Math.min(windowMs, 60_000));
  timer.unref();

  return {
    record(e) {
      const now = clock();
      const key = `${e.action}\u0000${e.actor}\u0000${e.ip}`;
      const s = keys.get(key);
      if (s && now - s.windowStart < windowMs) {
        s.suppressed++;
        s.last = e;
        suppressedTotal++;
        return;
      }
      const repeats = s?.suppressed ?? 0;
      if (!s && keys.size >= maxKeys) {
        globalSuppressed++;
        suppressedTotal++;
        return;
      }
      keys.set(key, { windowStart: now, suppressed: 0, last: e });
      budgeted(now, e, repeats > 0 ? { repeats, windowMs } : undefined);
    },
    sweep,
    close() {
      clearInterval(timer);
      sweep(clock(), true);
    },
    get rowsWritten() {
      return rowsWritten;
    },
    get suppressed() {
      return suppressedTotal;
    },
  };
}
