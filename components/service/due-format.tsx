import type { ServiceDueDto } from "@/shared/service-schema";

// Words and marks for a task's service status, shared by the /service list and the compressor page.

const statusLook = {
  overdue: { word: "Overdue", cls: "border-warning bg-warning text-warning-ink", shape: "shape-warning bg-warning-ink" },
  due: { word: "Due soon", cls: "border-advisory bg-advisory text-advisory-ink", shape: "shape-advisory bg-advisory-ink" },
  ok: { word: "In interval", cls: "border-line bg-panel text-ink", shape: "" },
} as const;

export function StatusChip({ status }: { status: ServiceDueDto["status"] }) {
  const l = statusLook[status];
  return (
    <span data-status={status} className={`inline-flex items-center gap-1 rounded border px-1.5 py-0.5 text-xs font-bold whitespace-nowrap ${l.cls}`}>
      {l.shape && <span aria-hidden className={`inline-block size-[0.9em] shrink-0 ${l.shape}`} />}
      {l.word}
    </span>
  );
}

export const num = (n: number) => Math.round(n).toLocaleString("en-GB");

export function intervalText(d: Pick<ServiceDueDto, "everyHours" | "everyMonths">): string {
  return [d.everyHours !== null ? `${num(d.everyHours)} h` : null, d.everyMonths !== null ? `${d.everyMonths} mo` : null].filter(Boolean).join(" or ");
}

export function dueText(d: ServiceDueDto): string {
  const parts: string[] = [];
  if (d.dueHours !== null) parts.push(`at ${num(d.dueHours)} h${d.hoursLeft !== null ? ` (${d.hoursLeft >= 0 ? `${num(d.hoursLeft)} h left` : `${num(-d.hoursLeft)} h over`})` : ""}`);
  if (d.dueDate !== null) parts.push(`by ${d.dueDate}`);
  return parts.join(" or ") || "—";
}

