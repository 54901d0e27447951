import { z } from "zod";

/** { label, siteIds } — no sites ticked means every site. */
export const displayLinkInputSchema = z.object({
  label: z.string().trim().min(1, "Enter a label, e.g. the room the screen hangs in").max(80, "At most 80 characters"),
  siteIds: z.array(z.number().int().positive()).max(500),
});
export type DisplayLinkInput = z.infer<typeof displayLinkInputSchema>;

export const displayLinkRevokeSchema = z.object({ id: z.number().int().positive() });

export type DisplayLinkDto = {
  id: number;
  label: string;
  /** null: every site. */
  siteIds: number[] | null;
  siteNames: string[] | null;
  createdByName: string;
  createdAt: number;
  revokedAt: number | null;
  lastUsedAt: number | null;
};
