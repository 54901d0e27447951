import { NextResponse } from "next/server";
import { z } from "zod";
import { AccessError } from "@/lib/auth/current-user";

export function errorJson(status: number, error: string, extra?: Record<string, unknown>) {
  return NextResponse.json({ error, ...extra }, { status, headers: { "cache-control": "no-store" } });
}

/** Wraps a route handler: access errors become 401/403, bad input 400, anything else a logged 500. */
export function route<A extends unknown[]>(handler: (...args: A) => Promise<Response>) {
  return async (...args: A): Promise<Response> => {
    try {
      return await handler(...args);
    } catch (e) {
      if (e instanceof AccessError) return errorJson(e.status, e.message);
      if (e instanceof z.ZodError) return errorJson(400, "Invalid request", { fieldErrors: z.flattenError(e).fieldErrors });
      console.error("[api] unhandled error", e);
      return errorJson(500, "Something went wrong on the server. It has been logged.");
    }
  };
}
