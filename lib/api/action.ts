import { z } from "zod";
import { AccessError, requirePermission, type CurrentUser } from "@/lib/auth/current-user";
import type { Permission } from "@/shared/roles";

export type ActionResult<T> =
  | { ok: true; data: T }
  | { ok: false; status: 400 | 401 | 403 | 404 | 409 | 500; error: string; fieldErrors?: Record<string, string[]> };

export class ActionFailure extends Error {
  constructor(
    readonly status: 400 | 404 | 409,
    message: string,
    readonly fieldErrors?: Record<string, string[]>,
  ) {
    super(message);
  }
}

/** The one shape of every server action: parse with the shared schema, authorise, run, return a result (never throw). */
export async function runAction<S extends z.ZodType, T>(
  permission: Permission,
  schema: S,
  input: unknown,
  run: (data: z.infer<S>, user: CurrentUser) => Promise<T> | T,
): Promise<ActionResult<T>> {
  try {
    const user = await requirePermission(permission);
    const parsed = schema.safeParse(input);
    if (!parsed.success) {
      return {
        ok: false,
        status: 400,
        error: "Some values need correcting.",
        fieldErrors: z.flattenError(parsed.error).fieldErrors as Record<string, string[]>,
      };
    }
    return { ok: true, data: await run(parsed.data, user) };
  } catch (e) {
    if (e instanceof AccessError) return { ok: false, status: e.status, error: e.message };
    if (e instanceof ActionFailure) return { ok: false, status: e.status, error: e.message, fieldErrors: e.fieldErrors };
    console.error("[action] unhandled error", e);
    return { ok: false, status: 500, error: "Something went wrong on the server. It has been logged." };
  }
}
