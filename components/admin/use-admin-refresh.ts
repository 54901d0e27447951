"use client";

import { useQueryClient } from "@tanstack/react-query";
import { adminKey } from "@/components/queries/admin";
import { fleetQueries } from "@/components/queries/fleet";

/** After an administrative change: refetch every admin list and the fleet lists other pages read. */
export function useAdminRefresh() {
  const client = useQueryClient();
  return () =>
    Promise.all([
      client.invalidateQueries({ queryKey: adminKey }),
      client.invalidateQueries({ queryKey: fleetQueries.sites().queryKey }),
      client.invalidateQueries({ queryKey: fleetQueries.compressors().queryKey }),
    ]);
}
