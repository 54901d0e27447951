"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition } from "react";
import { saveUnitPreference } from "@/lib/actions/preferences";
import { pressureUnits, temperatureLabel, temperatureUnits, type UnitPreference } from "@/shared/units";

export function UnitsPicker({ units }: { units: UnitPreference }) {
  const router = useRouter();
  const [pending, startTransition] = useTransition();
  const [error, setError] = useState<string | null>(null);

  function save(next: UnitPreference) {
    startTransition(async () => {
      const result = await saveUnitPreference(next);
      if (result.ok) {
        setError(null);
        router.refresh();
      } else setError(result.error);
    });
  }

  return (
    <div className="flex items-center gap-2 text-sm" aria-busy={pending}>
      <label className="flex items-center gap-1">
        <span className="text-muted">Pressure</span>
        <select
          aria-label="Pressure unit"
          className="rounded border border-line bg-raised px-1 py-0.5"
          value={units.pressureUnit}
          onChange={(e) => save({ ...units, pressureUnit: e.target.value as UnitPreference["pressureUnit"] })}
        >
          {pressureUnits.map((u) => (
            <option key={u} value={u}>
              {u}
            </option>
          ))}
        </select>
      </label>
      <label className="flex items-center gap-1">
        <span className="text-muted">Temperature</span>
        <select
          aria-label="Temperature unit"
          className="rounded border border-line bg-raised px-1 py-0.5"
          value={units.temperatureUnit}
          onChange={(e) => save({ ...units, temperatureUnit: e.target.value as UnitPreference["temperatureUnit"] })}
        >
          {temperatureUnits.map((u) => (
            <option key={u} value={u}>
              {temperatureLabel(u)}
            </option>
          ))}
        </select>
      </label>
      {error && <span role="alert" className="text-critical">{error}</span>}
    </div>
  );
}
