/** How far the demo's history backfill has got; the web shows a notice while it runs. */
export type BackfillStatus = { running: boolean; percent: number; startedAt: number; updatedAt: number };
