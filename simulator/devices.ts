import fs from "node:fs";
import path from "node:path";
import { z } from "zod";
import { deviceIdSchema, MAX_STAGES, siteCodeSchema } from "../shared/telemetry";
import { defaultOilPump, type CompressorSpec } from "./model/compressor";
import { profiles } from "./model/demand";

/** One simulated compressor as the demo seed writes it: identity, credential, site and nameplate. */
export const demoDeviceSchema = z
  .object({
    deviceId: deviceIdSchema,
    secret: z.string().min(8),
    siteCode: siteCodeSchema,
    timeZone: z.string().refine(validTimeZone, "an IANA time zone, e.g. Europe/London"),
    compressorId: z.number().int().positive(),
    name: z.string().min(1),
    stages: z.number().int().min(1).max(MAX_STAGES),
    ratedDeliveryLpm: z.number().positive().max(10_000),
    ratedPressureBar: z.number().positive().max(700),
    stopPressureBar: z.number().positive().max(700),
    restartPressureBar: z.number().positive().max(700),
    /** 0 = no storage bank: cylinders are filled straight from the compressor. */
    bankVolumeL: z.number().min(0).max(100_000),
    profile: z.enum(profiles),
    /** Pressure-lubricated with an oil pressure transmitter; defaults from size (3+ stages and ≥ 250 l/min). */
    oilPump: z.boolean().optional(),
  })
  .refine((d) => d.restartPressureBar < d.stopPressureBar, "restart pressure must be below stop pressure")
  .refine((d) => d.stopPressureBar <= d.ratedPressureBar, "stop pressure must not exceed rated pressure");
export type DemoDevice = z.infer<typeof demoDeviceSchema>;

export const demoDevicesFileSchema = z.object({ devices: z.array(demoDeviceSchema).min(1) });
export type DemoDevicesFile = z.infer<typeof demoDevicesFileSchema>;

function validTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat("en", { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

/** Beside the database: `<dir of DATABASE_URL>/demo-devices.json`. */
export function defaultDevicesPath(databaseUrl = process.env.DATABASE_URL ?? "data/airkeep.db"): string {
  return path.join(path.dirname(databaseUrl.replace(/^file:/, "")), "demo-devices.json");
}

/** Where the simulator keeps hour meters and start counters between runs, beside the device file. */
export function defaultStatePath(devicesPath: string): string {
  return path.join(path.dirname(devicesPath), "simulator-state.json");
}

export function readDevicesFile(file: string): DemoDevicesFile {
  let raw: unknown;
  try {
    raw = JSON.parse(fs.readFileSync(file, "utf8"));
  } catch (err) {
    throw new Error(`cannot read device list ${file}: ${(err as Error).message}. Run the demo seed first.`);
  }
  const parsed = demoDevicesFileSchema.safeParse(raw);
  if (!parsed.success) throw new Error(`device list ${file} is invalid: ${z.prettifyError(parsed.error)}`);
  return parsed.data;
}

export function writeDevicesFile(file: string, data: DemoDevicesFile): void {
  const valid = demoDevicesFileSchema.parse(data);
  fs.mkdirSync(path.dirname(file), { recursive: true });
  fs.writeFileSync(file, `${JSON.stringify(valid, null, 2)}\n`, { mode: 0o600 });
}

export function specFor(d: DemoDevice): CompressorSpec {
  return {
    deviceId: d.deviceId,
    stages: d.stages,
    ratedDeliveryLpm: d.ratedDeliveryLpm,
    ratedPressureBar: d.ratedPressureBar,
    stopPressureBar: d.stopPressureBar,
    restartPressureBar: d.restartPressureBar,
    bankVolumeL: d.bankVolumeL,
    profile: d.profile,
    timeZone: d.timeZone,
    oilPump: d.oilPump ?? defaultOilPump(d.stages, d.ratedDeliveryLpm),
  };
}
