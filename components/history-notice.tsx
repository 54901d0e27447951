"use client";

import { useQuery } from "@tanstack/react-query";
import { historyQueries } from "@/components/queries/history";
import type { BackfillStatus } from "@/shared/history";

/** While the demo writes its history, trends and reports are incomplete: say so until it is done. */
export function HistoryNotice({ initial }: { initial: BackfillStatus | null }) {
  const { data } = useQuery({ ...historyQueries.backfill(), initialData: initial, enabled: initial !== null });
  if (!data) return null;
  return (
    <p role="status" data-testid="history-notice" className="border-b border-line bg-raised px-4 py-1.5 text-sm">
      History is still being written ({data.percent} %): trends, reports and the event log fill in as it completes.
    </p>
  );
}
