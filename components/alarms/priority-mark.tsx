import { priorityRank, type Priority } from "@/shared/alarm-rules";

// Every alarm priority reads three ways: colour, shape and word (see tailwind.config.ts). Class names are written
// out in full so that Tailwind finds them.

export const priorityWords: Record<Priority, string> = { critical: "Critical", warning: "Warning", advisory: "Advisory" };

const shapeClass: Record<Priority, string> = {
  critical: "shape-critical bg-critical",
  warning: "shape-warning bg-warning",
  advisory: "shape-advisory bg-advisory",
};

/** A chip with the full colour behind the word, for lists where the priority is the first thing read. */
const chipClass: Record<Priority, string> = {
  critical: "border-critical bg-critical text-critical-ink",
  warning: "border-warning bg-warning text-warning-ink",
  advisory: "border-advisory bg-advisory text-advisory-ink",
};

const shapeOnChip: Record<Priority, string> = {
  critical: "shape-critical bg-critical-ink",
  warning: "shape-warning bg-warning-ink",
  advisory: "shape-advisory bg-advisory-ink",
};

export function PriorityShape({ priority, className = "size-[0.9em]" }: { priority: Priority; className?: string }) {
  return <span aria-hidden className={`inline-block shrink-0 ${shapeClass[priority]} ${className}`} />;
}

/** Shape + colour + word. `chip` fills the colour behind the word; otherwise the shape carries it. */
export function PriorityMark({ priority, chip = false }: { priority: Priority; chip?: boolean }) {
  if (chip) {
    return (
      <span
        data-priority={priority}
        className={`inline-flex items-center gap-1 rounded border px-1.5 py-0.5 text-xs font-bold tracking-wide uppercase ${chipClass[priority]}`}
      >
        <span aria-hidden className={`inline-block size-[0.9em] shrink-0 ${shapeOnChip[priority]}`} />
        {priorityWords[priority]}
      </span>
    );
  }
  return (
    <span data-priority={priority} className="inline-flex items-center gap-1 font-semibold text-ink">
      <PriorityShape priority={priority} />
      {priorityWords[priority]}
    </span>
  );
}

export const byPriority = (a: Priority, b: Priority) => priorityRank[a] - priorityRank[b];
