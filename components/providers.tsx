"use client";

import { QueryClientProvider } from "@tanstack/react-query";
import { useState, type ReactNode } from "react";
import type { UnitPreference } from "@/shared/units";
import { makeQueryClient } from "./query-client";
import { UnitsContext } from "./use-units";

export function Providers({ units, children }: { units: UnitPreference; children: ReactNode }) {
  const [client] = useState(makeQueryClient);
  return (
    <QueryClientProvider client={client}>
      <UnitsContext.Provider value={units}>{children}</UnitsContext.Provider>
    </QueryClientProvider>
  );
}
