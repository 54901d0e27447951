import Link from "next/link";
import type { ServiceBadge as Badge } from "@/shared/service-schema";

// Service due (advisory: diamond, violet) or overdue (warning: triangle, amber) on a board or kiosk tile: shape,
// colour and word, like an alarm of that priority. Nothing when every task is within its interval.

const look = {
  overdue: { cls: "border-warning bg-warning text-warning-ink", shape: "shape-warning bg-warning-ink", word: "Service overdue" },
  due: { cls: "border-advisory bg-advisory text-advisory-ink", shape: "shape-advisory bg-advisory-ink", word: "Service due" },
} as const;

export function ServiceBadge({ badge, label, href }: { badge: Badge | null | undefined; label: string; href?: string }) {
  if (!badge || badge.status === "ok") return null;
  const l = look[badge.status];
  const n = badge.status === "overdue" ? badge.overdue : badge.due;
  const title = `${label}: ${n} service task${n === 1 ? "" : "s"} ${badge.status}${badge.status === "overdue" && badge.due ? `, ${badge.due} coming due` : ""}`;
  const body = (
    <span
      data-testid="service-badge"
      data-status={badge.status}
      title={title}
      className={`inline-flex items-center gap-[0.3em] rounded-[0.2em] border px-[0.35em] py-[0.05em] text-[0.75em] leading-tight font-bold whitespace-nowrap ${l.cls}`}
    >
      <span aria-hidden className={`inline-block size-[0.85em] shrink-0 ${l.shape}`} />
      <span>{l.word}</span>
      <span className="sr-only">{title}</span>
    </span>
  );
  return href ? (
    <Link href={href} className="no-underline">
      {body}
    </Link>
  ) : (
    body
  );
}
