"use client";

import { createContext, useContext } from "react";
import { defaultUnits, type UnitPreference } from "@/shared/units";

export const UnitsContext = createContext<UnitPreference>(defaultUnits);

export function useUnits(): UnitPreference {
  return useContext(UnitsContext);
}
