import { z } from "zod";
import type { AttachmentDto } from "./attachment-schema";
import type { ServiceStatus } from "./service-due";

// Service plans, the service log and planned service windows: input schemas and DTOs.

const id = z.coerce.number().int().positive().max(2 ** 31);

export const serviceTaskCodeSchema = z
  .string()
  .trim()
  .regex(/^[a-z0-9][a-z0-9-]{0,39}$/, "A short code: lower-case letters, digits and hyphens");

export const serviceTaskInputSchema = z
  .object({
    code: serviceTaskCodeSchema,
    name: z.string().trim().min(1, "Enter a name").max(120),
    everyHours: z.number().finite().positive("Run hours must be above zero").max(100_000).nullable(),
    everyMonths: z.number().int("Whole months").min(1, "At least 1 month").max(240).nullable(),
    enabled: z.boolean(),
    note: z.string().trim().max(500),
  })
  .refine((t) => !t.enabled || t.everyHours !== null || t.everyMonths !== null, {
    path: ["everyHours"],
    message: "Give run hours, months or both",
  });
export type ServiceTaskInput = z.infer<typeof serviceTaskInputSchema>;

export const serviceTaskSaveSchema = z.object({
  scopeType: z.enum(["model", "compressor"]),
  scopeId: id,
  task: serviceTaskInputSchema,
});
export type ServiceTaskSave = z.infer<typeof serviceTaskSaveSchema>;

/** Removes a compressor's override (it inherits the model's task again) or a model's task. */
export const serviceTaskRemoveSchema = z.object({ scopeType: z.enum(["model", "compressor"]), scopeId: id, code: serviceTaskCodeSchema });

const text = (max: number) => z.string().max(max).transform((s) => s.replace(/\r\n?/g, "\n").trim());

export const serviceLogInputSchema = z.object({
  /** Client-generated id of this form submission: a repeated submit returns the entry already made. */
  submissionId: z.string().regex(/^[A-Za-z0-9_-]{8,64}$/, "Reload the form and try again"),
  compressorId: id,
  tasks: z.array(serviceTaskCodeSchema).min(1, "Tick at least one task").max(30),
  doneAt: z.number().int().positive(),
  /** Left empty: taken from the hour meter the compressor reported at that time. */
  hourMeterH: z.number().finite().min(0).max(1_000_000).nullable(),
  parts: text(2000),
  notes: text(4000),
});
export type ServiceLogInput = z.infer<typeof serviceLogInputSchema>;

export const serviceLogCorrectionSchema = z.object({
  id,
  tasks: z.array(serviceTaskCodeSchema).min(1, "Tick at least one task").max(30),
  doneAt: z.number().int().positive(),
  hourMeterH: z.number().finite().min(0).max(1_000_000).nullable(),
  parts: text(2000),
  notes: text(4000),
  reason: z.string().trim().min(3, "Say why the entry is corrected").max(500),
});
export type ServiceLogCorrection = z.infer<typeof serviceLogCorrectionSchema>;

export const serviceWindowInputSchema = z
  .object({
    compressorId: id,
    startAt: z.number().int().positive(),
    endAt: z.number().int().positive(),
    reason: z.string().trim().min(3, "Give a reason").max(300),
  })
  .refine((w) => w.endAt > w.startAt, { path: ["endAt"], message: "The end must be after the start" })
  .refine((w) => w.endAt - w.startAt <= 90 * 86_400_000, { path: ["endAt"], message: "A window is at most 90 days" });
export type ServiceWindowInput = z.infer<typeof serviceWindowInputSchema>;

export const serviceLeadSchema = z.object({
  leadHours: z.number().finite().min(0).max(5000),
  leadDays: z.number().int().min(0).max(365),
});
export type ServiceLead = z.infer<typeof serviceLeadSchema>;
export const defaultServiceLead: ServiceLead = { leadHours: 50, leadDays: 14 };

export const serviceListQuerySchema = z.object({
  site: id.optional(),
  compressor: id.optional(),
  sort: z.enum(["status", "forecast", "compressor", "task", "site"]).default("status"),
  dir: z.enum(["asc", "desc"]).default("asc"),
});
export type ServiceListQuery = z.infer<typeof serviceListQuerySchema>;

export const serviceLogQuerySchema = z.object({
  site: id.optional(),
  compressor: id.optional(),
  q: z.string().trim().max(200).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
});

export type ServiceTaskDto = {
  code: string;
  name: string;
  everyHours: number | null;
  everyMonths: number | null;
  enabled: boolean;
  note: string;
  /** Where the values come from for this compressor. */
  source: "model" | "override" | "compressor";
};

export type ServiceDueDto = {
  compressorId: number;
  compressorName: string;
  siteId: number;
  siteName: string;
  timeZone: string;
  code: string;
  name: string;
  everyHours: number | null;
  everyMonths: number | null;
  status: ServiceStatus;
  lastAt: number | null;
  lastHours: number | null;
  hourMeterH: number | null;
  dueHours: number | null;
  hoursLeft: number | null;
  dueDate: string | null;
  overdueAt: number | null;
  forecastAt: number | null;
  firstBy: "hours" | "calendar" | null;
  hoursPerDay: number | null;
};

/** The worst status of a compressor's tasks, for the board and kiosk tile badge. */
export type ServiceBadge = { status: ServiceStatus; overdue: number; due: number };

export type ServiceLogDto = {
  id: number;
  compressorId: number;
  compressorName: string;
  siteId: number;
  siteName: string;
  timeZone: string;
  doneAt: number;
  hourMeterH: number | null;
  tasks: { code: string; name: string }[];
  parts: string;
  notes: string;
  performedByName: string;
  createdAt: number;
  correctedAt: number | null;
  attachments: AttachmentDto[];
};

export type ServiceWindowDto = {
  id: number;
  compressorId: number;
  compressorName: string;
  siteId: number;
  timeZone: string;
  startAt: number;
  endAt: number;
  reason: string;
  createdAt: number;
};

export type ServiceOverviewDto = {
  /** Server time of the answer. */
  at: number;
  sites: { id: number; name: string; timeZone: string }[];
  compressors: { id: number; name: string; siteId: number; timeZone: string; tasks: { code: string; name: string }[] }[];
  due: ServiceDueDto[];
  log: ServiceLogDto[];
  windows: ServiceWindowDto[];
  lead: ServiceLead;
  /** For editing plans: each model's tasks, and each compressor's effective tasks (switched-off ones included). */
  plans: { models: { id: number; name: string; tasks: ServiceTaskDto[] }[]; compressors: Record<string, ServiceTaskDto[]> };
};
