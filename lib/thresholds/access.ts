import { headers } from "next/headers";
import { z } from "zod";
import type { ThresholdActor } from "@/db/threshold-edit";
import { clientAddress } from "@/lib/web/request-facts";
import type { CurrentUser } from "@/lib/auth/current-user";
import { scopeTypeSchema, type ScopeType } from "@/shared/threshold-schema";

/** The person as the threshold functions need them: role and sites for access, units for messages, address for audit. */
export async function thresholdActor(user: CurrentUser): Promise<ThresholdActor> {
  return {
    userId: user.id,
    name: user.name,
    email: user.email,
    role: user.role,
    siteIds: user.siteIds,
    units: user.units,
    ip: clientAddress(await headers()),
  };
}

const scopeParams = z.object({ scopeType: scopeTypeSchema, scopeId: z.coerce.number().int().positive() });

/** /api/thresholds/model/3 or /api/thresholds/compressor/5; null for anything else. */
export async function scopeFrom(params: Promise<{ scopeType: string; scopeId: string }>): Promise<{ scopeType: ScopeType; scopeId: number } | null> {
  const parsed = scopeParams.safeParse(await params);
  return parsed.success ? parsed.data : null;
}
