import { z } from "zod";

export const priorities = ["critical", "warning", "advisory"] as const;
export const prioritySchema = z.enum(priorities);
export type Priority = z.infer<typeof prioritySchema>;
export const priorityRank: Record<Priority, number> = { critical: 0, warning: 1, advisory: 2 };

/** Signals a limit can watch, in stored units (bar, °C). finalStageC is the highest fitted stage's outlet. */
export const alarmSignals = [
  "deliveryBar",
  "finalStageC",
  "stage1C",
  "stage2C",
  "stage3C",
  "stage4C",
  "oilBar",
  "purifierC",
  "intakeC",
] as const;
export const alarmSignalSchema = z.enum(alarmSignals);
export type AlarmSignal = z.infer<typeof alarmSignalSchema>;

export const signalInfo: Record<AlarmSignal, { label: string; kind: "pressure" | "temperature"; suppressWhenStopped: boolean }> = {
  deliveryBar: { label: "Delivery pressure", kind: "pressure", suppressWhenStopped: false },
  finalStageC: { label: "Final-stage temperature", kind: "temperature", suppressWhenStopped: true },
  stage1C: { label: "Stage 1 temperature", kind: "temperature", suppressWhenStopped: true },
  stage2C: { label: "Stage 2 temperature", kind: "temperature", suppressWhenStopped: true },
  stage3C: { label: "Stage 3 temperature", kind: "temperature", suppressWhenStopped: true },
  stage4C: { label: "Stage 4 temperature", kind: "temperature", suppressWhenStopped: true },
  oilBar: { label: "Oil pressure", kind: "pressure", suppressWhenStopped: true },
  purifierC: { label: "Purifier temperature", kind: "temperature", suppressWhenStopped: false },
  intakeC: { label: "Intake temperature", kind: "temperature", suppressWhenStopped: false },
};

export const limitSchema = z.object({
  signal: alarmSignalSchema,
  direction: z.enum(["high", "low"]),
  priority: prioritySchema,
  value: z.number().finite(),
  deadband: z.number().finite().min(0),
  onDelayS: z.number().finite().min(0).max(3600),
  offDelayS: z.number().finite().min(0).max(3600),
});
export type Limit = z.infer<typeof limitSchema>;

export const limitKey = (l: Pick<Limit, "signal" | "direction" | "priority">) => `${l.signal}.${l.direction}.${l.priority}`;

export const alarmSettingsSchema = z.object({
  /** After a start, temperature and oil alarms wait this long before they may raise. */
  settlingS: z.number().min(0).max(3600),
  /** An acknowledged alarm still active after this long is announced again; 0 turns re-alarm off. */
  reAlarmS: z.number().min(0).max(7 * 86400),
  chatterCount: z.number().int().min(2).max(20),
  chatterWindowS: z.number().min(1).max(3600),
});
export type AlarmSettings = z.infer<typeof alarmSettingsSchema>;

export const defaultAlarmSettings: AlarmSettings = { settlingS: 120, reAlarmS: 4 * 3600, chatterCount: 3, chatterWindowS: 60 };
