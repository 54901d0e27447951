/**
 * The evaluator's timers (on/off-delay starts, run start for settling, recent raises for chattering) kept in SQLite
 * beside the alarms, written in the same transaction as the alarm changes, so a restarted engine resumes exactly where
 * the previous one stopped. Stored as one `settings` row per compressor ("alarm-engine.state.<id>").
 */
import type { Statement } from "better-sqlite3";
import { z } from "zod";
import type { Db } from "@/db/client";
import type { EvaluatorState } from "@/shared/alarm-eval";
import { runStates } from "@/shared/telemetry";

export const SNAPSHOT_PREFIX = "alarm-engine.state.";

const snapshotSchema = z.object({
  v: z.literal(1),
  lastTs: z.number(),
  lastStarts: z.number().nullable(),
  state: z.object({
    runningSince: z.number().nullable(),
    lastRunState: z.enum(runStates).nullable(),
    limits: z.record(z.string(), z.object({ active: z.boolean(), since: z.number().nullable(), raises: z.array(z.number()) })),
    trip: z.object({ active: z.boolean(), code: z.number().nullable() }),
  }),
});
export type EngineSnapshot = { v: 1; lastTs: number; lastStarts: number | null; state: EvaluatorState };

export function parseSnapshot(text: string | undefined): EngineSnapshot | null {
  if (!text) return null;
  try {
    const parsed = snapshotSchema.safeParse(JSON.parse(text));
    return parsed.success ? (parsed.data as EngineSnapshot) : null;
  } catch {
    return null;
  }
}

export type SnapshotStore = {
  all(): Map<number, string>;
  one(compressorId: number): string | undefined;
  write(compressorId: number, value: string, now: number): void;
};

export function createSnapshotStore(db: Db): SnapshotStore {
  const sqlite = db.$client;
  const selectAll = sqlite.prepare(`SELECT key, value FROM settings WHERE key >= ? AND key < ?`);
  const selectOne = sqlite.prepare(`SELECT value FROM settings WHERE key = ?`);
  const upsert: Statement = sqlite.prepare(
    `INSERT INTO settings (key, value, updated_at) VALUES (?, ?, ?)
     ON CONFLICT (key) DO UPDATE SET value = excluded.value, updated_at = excluded.updated_at`,
  );
  return {
    all() {
      const out = new Map<number, string>();
      // "." + 1 is "/": the half-open range covers every key with the prefix and uses the primary key.
      for (const r of selectAll.all(SNAPSHOT_PREFIX, SNAPSHOT_PREFIX.slice(0, -1) + "/") as { key: string; value: string }[]) {
        const id = Number(r.key.slice(SNAPSHOT_PREFIX.length));
        if (Number.isInteger(id)) out.set(id, r.value);
      }
      return out;
    },
    one(compressorId) {
      return (selectOne.get(SNAPSHOT_PREFIX + compressorId) as { value: string } | undefined)?.value;
    },
    write(compressorId, value, now) {
      upsert.run(SNAPSHOT_PREFIX + compressorId, value, now);
    },
  };
}
