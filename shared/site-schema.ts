import { z } from "zod";
import { siteCodeSchema } from "./telemetry";

export function isValidTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat("en-GB", { timeZone: tz });
    return tz.includes("/") || tz === "UTC";
  } catch {
    return false;
  }
}

export const siteInputSchema = z.object({
  name: z.string().trim().min(1, "Enter a name").max(120),
  code: siteCodeSchema,
  timeZone: z.string().trim().refine(isValidTimeZone, "Choose an IANA time zone such as Europe/London"),
  address: z.string().trim().max(300),
});
export type SiteInput = z.infer<typeof siteInputSchema>;

export const siteUpdateSchema = siteInputSchema.extend({ id: z.number().int().positive() });
export type SiteUpdate = z.infer<typeof siteUpdateSchema>;

export type SiteDto = { id: number; name: string; code: string; timeZone: string; address: string };
