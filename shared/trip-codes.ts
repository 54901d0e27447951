/**
 * Airkeep's own trip-code table: the protective shutdowns a compressor gateway reports in `tripCode`.
 * Numbering: 1xx temperature, 2xx pressure and lubrication, 3xx motor and supply, 4xx sensors, 5xx air treatment, 9xx operator.
 */
export type TripCategory = "temperature" | "pressure" | "motor" | "sensor" | "treatment" | "operator";

export type TripCodeInfo = {
  code: number;
  key: string;
  category: TripCategory;
  label: string;
  description: string;
};

export const tripCodes = [
  {
    code: 110,
    key: "final-stage-overtemp",
    category: "temperature",
    label: "Final stage over-temperature",
    description: "Outlet temperature of the last stage passed the machine's own trip limit.",
  },
  {
    code: 111,
    key: "stage-overtemp",
    category: "temperature",
    label: "Stage over-temperature",
    description: "Outlet temperature of an earlier stage passed the machine's own trip limit.",
  },
  {
    code: 120,
    key: "cooling-fan",
    category: "temperature",
    label: "Cooling fan failure",
    description: "The cooling-air fan stopped or its motor protection opened.",
  },
  {
    code: 210,
    key: "oil-pressure-low",
    category: "pressure",
    label: "Oil pressure low",
    description: "Lubricating oil pressure stayed below the trip limit while the motor ran.",
  },
  {
    code: 220,
    key: "delivery-overpressure",
    category: "pressure",
    label: "Delivery over-pressure",
    description: "Delivery pressure rose above the rated pressure: the stop switch did not act.",
  },
  {
    code: 230,
    key: "interstage-pressure",
    category: "pressure",
    label: "Interstage pressure out of range",
    description: "Pressure after a stage left its expected band, typically from a leaking valve.",
  },
  {
    code: 310,
    key: "motor-overload",
    category: "motor",
    label: "Motor overload",
    description: "The motor overload relay opened.",
  },
  {
    code: 320,
    key: "supply-fault",
    category: "motor",
    label: "Supply fault",
    description: "Phase loss, phase sequence or under-voltage on the motor supply.",
  },
  {
    code: 330,
    key: "start-failed",
    category: "motor",
    label: "Start sequence failed",
    description: "The motor did not reach running within the start time.",
  },
  {
    code: 410,
    key: "temperature-sensor",
    category: "sensor",
    label: "Temperature sensor fault",
    description: "A stage temperature sensor reads open circuit or outside its range.",
  },
  {
    code: 420,
    key: "pressure-sensor",
    category: "sensor",
    label: "Pressure transmitter fault",
    description: "A pressure transmitter signal is outside its range.",
  },
  {
    code: 510,
    key: "condensate-drain",
    category: "treatment",
    label: "Condensate drain fault",
    description: "The automatic condensate drain did not open or close as commanded.",
  },
  {
    code: 520,
    key: "purifier-lockout",
    category: "treatment",
    label: "Purifier cartridge lock-out",
    description: "The purifier cartridge reached its end of life and the machine locked out.",
  },
  {
    code: 910,
    key: "emergency-stop",
    category: "operator",
    label: "Emergency stop",
    description: "The emergency stop button was pressed.",
  },
] as const satisfies readonly TripCodeInfo[];

export type TripCodeKey = (typeof tripCodes)[number]["key"];

const byCode = new Map<number, TripCodeInfo>(tripCodes.map((t) => [t.code, t]));
const byKey = new Map<string, TripCodeInfo>(tripCodes.map((t) => [t.key, t]));

export function tripCodeInfo(code: number | null | undefined): TripCodeInfo | null {
  return code == null ? null : (byCode.get(code) ?? null);
}

export function tripCode(key: TripCodeKey): number {
  return byKey.get(key)!.code;
}

/** Text for a code that may be unknown to this table (a newer gateway, another maker). */
export function tripCodeLabel(code: number | null | undefined): string {
  if (code == null) return "";
  return tripCodeInfo(code)?.label ?? `Trip code ${code}`;
}
