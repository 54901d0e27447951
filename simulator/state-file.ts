import fs from "node:fs";
import path from "node:path";
import { z } from "zod";
import type { ModelCounters } from "./model/compressor";

const stateFileSchema = z.object({
  v: z.literal(1),
  savedAtMs: z.number(),
  devices: z.record(
    z.string(),
    z.object({ atMs: z.number(), hourMeterH: z.number().min(0), starts: z.number().int().min(0), bankBar: z.number() }),
  ),
});

export type SavedCounters = ModelCounters & { atMs: number };

/** Hour meters, start counters and bank pressures a previous run left, by device id; empty when none. */
export function readCounters(file: string): Map<string, SavedCounters> {
  try {
    const parsed = stateFileSchema.safeParse(JSON.parse(fs.readFileSync(file, "utf8")));
    return parsed.success ? new Map(Object.entries(parsed.data.devices)) : new Map();
  } catch {
    return new Map();
  }
}

/** Merges into the file (devices not given keep their entry); written atomically. */
export function writeCounters(file: string, counters: ReadonlyMap<string, SavedCounters>): void {
  const merged = readCounters(file);
  for (const [id, c] of counters) merged.set(id, c);
  const body = { v: 1, savedAtMs: Date.now(), devices: Object.fromEntries(merged) };
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const tmp = `${file}.${process.pid}.tmp`;
  fs.writeFileSync(tmp, `${JSON.stringify(body, null, 2)}\n`);
  fs.renameSync(tmp, file);
}
