import { priorities, type Priority } from "@/shared/alarm-rules";
import type { AlarmCounts } from "@/shared/alarm-schema";
import { priorityWords } from "./priority-mark";

const badgeClass: Record<Priority, string> = {
  critical: "border-critical bg-critical text-critical-ink",
  warning: "border-warning bg-warning text-warning-ink",
  advisory: "border-advisory bg-advisory text-advisory-ink",
};

const shapeClass: Record<Priority, string> = {
  critical: "shape-critical bg-critical-ink",
  warning: "shape-warning bg-warning-ink",
  advisory: "shape-advisory bg-advisory-ink",
};

/**
 * Active alarms of one compressor by priority, for a board tile: one badge per priority present, each with its
 * shape, colour, count and word; nothing at all when there are none. Sized in em, so it scales with the tile's text.
 * `href` makes the group a link (e.g. to /alarms?compressor=<id>); leave it out on a kiosk screen.
 * Counts come from GET /api/alarms/counts (alarmQueries.counts() in components/queries/alarms.ts).
 */
export function AlarmBadges({ counts, label, href }: { counts: AlarmCounts | null | undefined; label?: string; href?: string }) {
  const present = priorities.filter((p) => (counts?.[p] ?? 0) > 0);
  if (!counts || present.length === 0) return null;
  const summary = present.map((p) => `${counts[p]} ${priorityWords[p].toLowerCase()}`).join(", ");
  const title = `${label ? `${label}: ` : ""}active alarms: ${summary}`;
  const badges = present.map((p) => (
    <span
      key={p}
      data-priority={p}
      data-count={counts[p]}
      className={`inline-flex items-center gap-[0.3em] rounded-[0.2em] border px-[0.35em] py-[0.05em] text-[0.75em] leading-tight font-bold ${badgeClass[p]}`}
    >
      <span aria-hidden className={`inline-block size-[0.85em] shrink-0 ${shapeClass[p]}`} />
      <span className="num">{counts[p]}</span>
      <span>{priorityWords[p]}</span>
    </span>
  ));
  const className = "inline-flex flex-wrap items-center justify-end gap-[0.25em]";
  return href ? (
    <a href={href} data-testid="alarm-badges" aria-label={title} title={title} className={`${className} no-underline`}>
      {badges}
    </a>
  ) : (
    <span role="img" data-testid="alarm-badges" aria-label={title} title={title} className={className}>
      {badges}
    </span>
  );
}
