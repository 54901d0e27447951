import { queryOptions } from "@tanstack/react-query";
import type { BackfillStatus } from "@/shared/history";
import { getJson } from "./get-json";

export const historyQueries = {
  backfill: () =>
    queryOptions({
      queryKey: ["history", "backfill"],
      queryFn: () => getJson<{ backfill: BackfillStatus | null }>("/api/history-status").then((r) => r.backfill),
      refetchInterval: (q) => (q.state.data ? 5_000 : false),
    }),
};
