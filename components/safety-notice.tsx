import { SAFETY_NOTICE } from "@/shared/safety";

export function SafetyNotice({ compact = false }: { compact?: boolean }) {
  return (
    <p
      role="note"
      aria-label="Safety notice"
      data-testid="safety-notice"
      className={`border-t border-line bg-panel text-muted ${compact ? "px-3 py-1 text-xs" : "px-4 py-2 text-sm"}`}
    >
      <strong className="text-ink">Safety: </strong>
      {SAFETY_NOTICE}
    </p>
  );
}
