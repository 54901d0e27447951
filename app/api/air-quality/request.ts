import { z } from "zod";
import { errorJson } from "@/lib/api/route";
import { AirQualityRefusal } from "@/lib/air-quality/service";

/**
 * The record travels as JSON in the `record` query parameter (a few hundred bytes) so it is checked before the file in
 * the multipart body is read; a request without a multipart body carries no file.
 */
export function recordFrom<S extends z.ZodType>(request: Request, schema: S): z.infer<S> {
  const raw = new URL(request.url).searchParams.get("record") ?? "";
  let json: unknown;
  try {
    json = JSON.parse(raw);
  } catch {
    throw new z.ZodError([{ code: "custom", path: ["record"], message: "The record is not valid JSON.", input: raw }]);
  }
  return schema.parse(json);
}

export const hasFile = (request: Request) => /^multipart\/form-data;/i.test(request.headers.get("content-type") ?? "");

export function refusalJson(e: unknown): Response | null {
  if (e instanceof AirQualityRefusal) return errorJson(e.status, e.message, e.fieldErrors ? { fieldErrors: e.fieldErrors } : undefined);
  return null;
}
