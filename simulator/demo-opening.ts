import type { DemoDevice } from "./devices";
import type { FaultSpec } from "./model/faults";
import type { SavedCounters } from "./state-file";

const MIN = 60_000;
const FILLING = "mb-main";
const INCIDENT = "hr-bay";

export type Opening = {
  faults: FaultSpec[];
  /** Bank pressures that make the two units start at once, merged over the saved counters. */
  init: Map<string, Partial<SavedCounters>>;
  /** What is about to happen and where to look, for the terminal. */
  story: string[];
};

/**
 * The demo's first ten minutes, the same at every start: one unit fills its bank (time to stop pressure on the
 * board) and another loses its cooling and walks the whole alarm path to the machine's own trip. Timings measured
 * on the model: final-stage warning after about 6 min, critical about 7½ min, trip about 10 min.
 * Null when the device list is not the demo fleet.
 */
export function demoOpening(devices: readonly DemoDevice[], now: number, webUrl: string): Opening | null {
  const filling = devices.find((d) => d.deviceId === FILLING);
  const incident = devices.find((d) => d.deviceId === INCIDENT);
  if (!filling || !incident) return null;
  const init = new Map<string, Partial<SavedCounters>>([
    [filling.deviceId, { bankBar: filling.restartPressureBar - 60 }],
    [incident.deviceId, { bankBar: incident.restartPressureBar - 45 }],
  ]);
  const faults: FaultSpec[] = [
    { deviceId: incident.deviceId, kind: "cooling", atMs: now + 0.5 * MIN, durationMs: null, rampMs: MIN, fanTrip: false },
  ];
  const story = [
    "The demo's opening (it plays at every start of the live simulator):",
    `  now       ${filling.name} starts filling its bank: the board shows its time to stop pressure (${webUrl}/board).`,
    `  ~6 min    ${incident.name} has lost its cooling air: a final-stage temperature warning,`,
    `  ~8 min    then a critical alarm and an e-mail to the on-call technician (${webUrl}/admin/mailbox),`,
    `  ~10 min   then the machine's own protective trip. Acknowledge from the e-mail's link or at ${webUrl}/alarms.`,
    "  After that, random incidents go on at about two a day across the fleet.",
  ];
  return { faults, init, story };
}
