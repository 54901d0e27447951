import { z } from "zod";
import { deviceIdSchema, MAX_STAGES } from "./telemetry";

const positive = (label: string, max: number) =>
  z.coerce.number({ error: `Enter ${label}` }).finite().positive(`${label} must be above zero`).max(max, `${label} is at most ${max}`);

export const compressorModelInputSchema = z.object({
  name: z.string().trim().min(1, "Enter a name").max(120),
  maker: z.string().trim().max(120),
  stages: z.coerce.number().int("Whole number of stages").min(1, "At least 1 stage").max(MAX_STAGES, `At most ${MAX_STAGES} stages`),
  ratedDeliveryLpm: positive("rated delivery", 10_000),
  ratedPressureBar: positive("rated pressure", 700),
});
export type CompressorModelInput = z.infer<typeof compressorModelInputSchema>;
export const compressorModelUpdateSchema = compressorModelInputSchema.extend({ id: z.number().int().positive() });
export type CompressorModelUpdate = z.infer<typeof compressorModelUpdateSchema>;

export const compressorInputSchema = z
  .object({
    name: z.string().trim().min(1, "Enter a name").max(120),
    siteId: z.coerce.number().int().positive("Choose a site"),
    modelId: z.coerce.number().int().positive("Choose a model"),
    serial: z.string().trim().min(1, "Enter the serial number").max(60),
    deviceId: deviceIdSchema,
    stopPressureBar: positive("stop pressure", 700),
    restartPressureBar: positive("restart pressure", 700),
    bankVolumeL: z.coerce.number().finite().min(0, "Bank volume cannot be negative").max(100_000),
    inService: z.boolean(),
  })
  .refine((c) => c.restartPressureBar < c.stopPressureBar, {
    path: ["restartPressureBar"],
    message: "Restart pressure must be below the stop pressure",
  });
export type CompressorInput = z.infer<typeof compressorInputSchema>;

export const compressorUpdateSchema = z.intersection(compressorInputSchema, z.object({ id: z.number().int().positive() }));
export type CompressorUpdate = z.infer<typeof compressorUpdateSchema>;

/** The stop pressure may not exceed the model's rated pressure; checked where both are known. */
export function stopPressureProblem(stopPressureBar: number, ratedPressureBar: number): string | null {
  return stopPressureBar > ratedPressureBar
    ? `Stop pressure is above the model's rated ${ratedPressureBar} bar`
    : null;
}

export type CompressorModelDto = {
  id: number;
  name: string;
  maker: string;
  stages: number;
  ratedDeliveryLpm: number;
  ratedPressureBar: number;
};

export type CompressorDto = {
  id: number;
  name: string;
  serial: string;
  deviceId: string;
  siteId: number;
  siteName: string;
  siteCode: string;
  timeZone: string;
  modelId: number;
  modelName: string;
  stages: number;
  ratedDeliveryLpm: number;
  ratedPressureBar: number;
  stopPressureBar: number;
  restartPressureBar: number;
  bankVolumeL: number;
  inService: boolean;
  hasDeviceCredential: boolean;
};
