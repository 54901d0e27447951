import { z } from "zod";
import { roleSchema } from "./roles";
import { unitPreferenceSchema } from "./units";

export const emailSchema = z.string().trim().toLowerCase().pipe(z.email("Enter a valid e-mail address").max(254));
export const passwordSchema = z
  .string()
  .min(10, "At least 10 characters")
  .max(200, "At most 200 characters");

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string().min(1, "Enter your password").max(200),
});
export type SignInInput = z.infer<typeof signInSchema>;

const siteIdsSchema = z.array(z.coerce.number().int().positive()).max(500);

// Administrators manage users, sites and credentials for the whole organisation, so they are never limited to sites.
const adminSeesEverySite: [(u: { role: string; siteIds: number[] }) => boolean, { path: string[]; message: string }] = [
  (u) => u.role !== "admin" || u.siteIds.length === 0,
  { path: ["siteIds"], message: "Administrators always see every site; leave the site scope empty" },
];

// "Every site" is a choice of its own: an empty list is no site, so deleting a person's last site never widens them.
const scopeIsChosen: [(u: { role: string; allSites: boolean; siteIds: number[] }) => boolean, { path: string[]; message: string }] = [
  (u) => u.role === "admin" || u.allSites || u.siteIds.length > 0,
  { path: ["siteIds"], message: "Choose one or more sites, or tick Every site" },
];

export const userInviteSchema = z.object({
  email: emailSchema,
  name: z.string().trim().min(1, "Enter a name").max(120),
  role: roleSchema,
  allSites: z.boolean(),
  siteIds: siteIdsSchema,
  password: passwordSchema,
}).refine(...adminSeesEverySite).refine(...scopeIsChosen);
export type UserInvite = z.infer<typeof userInviteSchema>;

export const userUpdateSchema = z.object({
  id: z.number().int().positive(),
  role: roleSchema,
  allSites: z.boolean(),
  siteIds: siteIdsSchema,
  disabled: z.boolean(),
}).refine(...adminSeesEverySite).refine(...scopeIsChosen);
export type UserUpdate = z.infer<typeof userUpdateSchema>;

export const unitPreferenceUpdateSchema = unitPreferenceSchema;

export type UserDto = {
  id: number;
  email: string;
  name: string;
  role: z.infer<typeof roleSchema>;
  disabled: boolean;
  /** Sees every site, also sites added later (always true for administrators). */
  allSites: boolean;
  /** The sites of a person who does not see every site; empty: none. */
  siteIds: number[];
  pressureUnit: z.infer<typeof unitPreferenceSchema>["pressureUnit"];
  temperatureUnit: z.infer<typeof unitPreferenceSchema>["temperatureUnit"];
  createdAt: number;
};
