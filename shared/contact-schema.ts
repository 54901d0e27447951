import { z } from "zod";
import { prioritySchema, type Priority } from "./alarm-rules";
import { parseClock } from "./notify-rota";
import { emailSchema } from "./user-schema";

// Contacts, notification rules and the on-call rota: the forms' schemas (shared by the browser and the server actions)
// and the shapes the admin screens read.

/** "" or null → null; anything else must be a positive whole number (form selects give strings). */
const optionalId = (message: string) =>
  z.preprocess((v) => (v === "" || v === undefined ? null : v), z.coerce.number().int().positive(message).nullable());

const requiredId = (message: string) => z.preprocess((v) => (v === "" ? undefined : v), z.coerce.number({ error: message }).int().positive(message));

export const contactInputSchema = z.object({
  name: z.string().trim().min(1, "Enter a name").max(120, "At most 120 characters"),
  email: emailSchema,
  userId: optionalId("Choose an account"),
  active: z.boolean(),
  note: z.string().trim().max(300, "At most 300 characters"),
});
export type ContactInput = z.infer<typeof contactInputSchema>;
export const contactUpdateSchema = contactInputSchema.extend({ id: z.number().int().positive() });
export type ContactUpdate = z.infer<typeof contactUpdateSchema>;

export const MAX_ESCALATE_AFTER_MIN = 24 * 60;

export const ruleTargets = ["contact", "on-call"] as const;
export const ruleModes = ["chain", "copy"] as const;

export const ruleInputSchema = z
  .object({
    siteId: optionalId("Choose a site"),
    minPriority: prioritySchema,
    target: z.enum(ruleTargets),
    contactId: optionalId("Choose a contact"),
    mode: z.enum(ruleModes),
    position: z.coerce.number({ error: "Enter a whole number" }).int("Enter a whole number").min(0, "At least 0").max(999, "At most 999"),
    escalateAfterMin: z.preprocess(
      (v) => (v === "" || v === undefined ? null : v),
      z.coerce
        .number({ error: "Enter minutes" })
        .int("Whole minutes")
        .min(1, "At least 1 minute")
        .max(MAX_ESCALATE_AFTER_MIN, `At most ${MAX_ESCALATE_AFTER_MIN} minutes`)
        .nullable(),
    ),
    enabled: z.boolean(),
  })
  .refine((r) => r.target !== "contact" || r.contactId !== null, { path: ["contactId"], message: "Choose the contact to tell" });
export type RuleInput = z.infer<typeof ruleInputSchema>;
export const ruleUpdateSchema = z.intersection(ruleInputSchema, z.object({ id: z.number().int().positive() }));
export type RuleUpdate = z.infer<typeof ruleUpdateSchema>;

const clock = z
  .string()
  .trim()
  .refine((t) => parseClock(t) !== null, "Enter a time as HH:MM, 00:00 to 23:59");

export const rotaEntryInputSchema = z.object({
  siteId: requiredId("Choose a site"),
  contactId: requiredId("Choose a contact"),
  position: z.coerce.number({ error: "Enter a whole number" }).int("Enter a whole number").min(0, "At least 0").max(999, "At most 999"),
  weekdays: z
    .array(z.coerce.number().int().min(1).max(7))
    .min(1, "Choose at least one day")
    .max(7)
    .transform((days) => [...new Set(days)].sort((a, b) => a - b)),
  startTime: clock,
  endTime: clock,
});
export type RotaEntryInput = z.infer<typeof rotaEntryInputSchema>;
export const rotaEntryUpdateSchema = rotaEntryInputSchema.extend({ id: z.number().int().positive() });
export type RotaEntryUpdate = z.infer<typeof rotaEntryUpdateSchema>;

export const idSchema = z.object({ id: z.number().int().positive() });
export const testMailSchema = z.object({ contactId: z.number().int().positive() });

export type ContactDto = {
  id: number;
  name: string;
  email: string;
  userId: number | null;
  userName: string | null;
  active: boolean;
  note: string;
  ruleCount: number;
  rotaCount: number;
};

export type RuleDto = {
  id: number;
  siteId: number | null;
  siteName: string | null;
  minPriority: Priority;
  target: (typeof ruleTargets)[number];
  contactId: number | null;
  contactName: string | null;
  mode: (typeof ruleModes)[number];
  position: number;
  escalateAfterMin: number | null;
  enabled: boolean;
};

export type RotaEntryDto = {
  id: number;
  siteId: number;
  siteName: string;
  timeZone: string;
  contactId: number;
  contactName: string;
  contactActive: boolean;
  position: number;
  weekdays: number[];
  startTime: string;
  endTime: string;
  onCallNow: boolean;
};

export type OnCallNowDto = { siteId: number; siteName: string; timeZone: string; contacts: { id: number; name: string }[] };

export type ContactsOverview = {
  contacts: ContactDto[];
  rules: RuleDto[];
  rota: RotaEntryDto[];
  onCallNow: OnCallNowDto[];
  /** The ESCALATE_AFTER_MIN in force, for rules that leave it empty. */
  defaultEscalateAfterMin: number;
  /** When the on-call answer was computed. */
  at: number;
};
