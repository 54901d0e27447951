import { z } from "zod";
import { themes } from "./palette";
import { pressureUnitSchema, temperatureUnitSchema } from "./units";

/** { label, siteIds, theme, units } — no sites ticked means every site; a wall screen is dark unless chosen otherwise. */
export const displayLinkInputSchema = z.object({
  label: z.string().trim().min(1, "Enter a label, e.g. the room the screen hangs in").max(80, "At most 80 characters"),
  siteIds: z.array(z.number().int().positive()).max(500),
  theme: z.enum(themes as ["light", "dark"]).default("dark"),
  pressureUnit: pressureUnitSchema.default("bar"),
  temperatureUnit: temperatureUnitSchema.default("C"),
});
export type DisplayLinkInput = z.infer<typeof displayLinkInputSchema>;

export const displayLinkRevokeSchema = z.object({ id: z.number().int().positive() });

export type DisplayLinkDto = {
  id: number;
  label: string;
  /** null: every site. */
  siteIds: number[] | null;
  siteNames: string[] | null;
  theme: "light" | "dark";
  pressureUnit: "bar" | "psi" | "MPa";
  temperatureUnit: "C" | "F";
  createdByName: string;
  createdAt: number;
  revokedAt: number | null;
  lastUsedAt: number | null;
};
