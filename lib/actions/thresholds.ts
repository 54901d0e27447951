"use server";

import { z } from "zod";
import { getDb } from "@/db/client";
import { revertThresholdChange, saveThresholdSet, ThresholdRefusal, type SaveThresholdsResult } from "@/db/threshold-edit";
import { ActionFailure, runAction, type ActionResult } from "@/lib/api/action";
import { AccessError } from "@/lib/auth/current-user";
import { thresholdRevertSchema, thresholdScopeSchema } from "@/shared/threshold-schema";
import { thresholdActor } from "@/lib/thresholds/access";

// The save's full rules need what the set inherits, so the shared schema (shared/threshold-schema.ts) is applied in
// saveThresholdSet with that context; here only the envelope is checked, after the permission.
const saveEnvelope = thresholdScopeSchema.extend({
  baseVersion: z.number().int().min(0),
  reason: z.string().max(500),
  limits: z.array(z.unknown()).max(200),
});

function refusals<T>(write: () => T): T {
  try {
    return write();
  } catch (e) {
    if (e instanceof ThresholdRefusal) {
      if (e.status === 403) throw new AccessError(403, e.message);
      throw new ActionFailure(e.status, e.message, e.fieldErrors);
    }
    throw e;
  }
}

/** { scopeType, scopeId, baseVersion, reason, limits: [{ signal, direction, priority, value, deadband, onDelayS, offDelayS, enabled }] } */
export async function saveThresholds(input: unknown): Promise<ActionResult<SaveThresholdsResult>> {
  return runAction("thresholds.edit", saveEnvelope, input, async (data, user) => {
    const actor = await thresholdActor(user);
    return refusals(() => saveThresholdSet(getDb(), data, actor));
  });
}

/** { auditId, baseVersion } — puts the set back as it was before that change (itself a version-checked, audited save). */
export async function revertThresholds(input: unknown): Promise<ActionResult<SaveThresholdsResult>> {
  return runAction("thresholds.edit", thresholdRevertSchema, input, async (data, user) => {
    const actor = await thresholdActor(user);
    return refusals(() => revertThresholdChange(getDb(), data, actor));
  });
}
