import { SAFETY_NOTICE } from "@/shared/safety";

/** `sticky`: stays in view at the bottom of the window (from 640 px wide; on a phone it ends the page). */
export function SafetyNotice({ compact = false, sticky = false }: { compact?: boolean; sticky?: boolean }) {
  return (
    <p
      role="note"
      aria-label="Safety notice"
      data-testid="safety-notice"
      className={`border-t border-line bg-panel text-muted ${compact ? "px-3 py-1 text-xs" : "px-4 py-2 text-sm"} ${sticky ? "sm:sticky sm:bottom-0 sm:z-10" : ""}`}
    >
      <strong className="text-ink">Safety: </strong>
      {SAFETY_NOTICE}
    </p>
  );
}
