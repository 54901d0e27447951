import type { Priority } from "@/shared/alarm-rules";

const shape: Record<Priority, string> = { critical: "shape-critical", warning: "shape-warning", advisory: "shape-advisory" };
const fill: Record<Priority, string> = { critical: "bg-critical", warning: "bg-warning", advisory: "bg-advisory" };
export const priorityWord: Record<Priority, string> = { critical: "Critical", warning: "Warning", advisory: "Advisory" };

/** A priority by shape, colour and word (reads in greyscale and without colour vision). */
export function PriorityMark({ priority, word = true }: { priority: Priority; word?: boolean }) {
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap">
      <span aria-hidden className={`${shape[priority]} ${fill[priority]} inline-block size-3 shrink-0`} />
      {word ? <span>{priorityWord[priority]}</span> : <span className="sr-only">{priorityWord[priority]}</span>}
    </span>
  );
}
