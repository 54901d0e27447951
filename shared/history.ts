/** A running backfill of the demo's history, as signed-in pages show it. */
export type BackfillStatus = { running: true; percent: number; since: number };
