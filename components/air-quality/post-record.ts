import type { ActionResult } from "@/lib/api/action";

/** Posts a record (JSON in the query) with an optional file, answering in the shape the form kit expects. */
export async function postRecord<T>(url: string, input: unknown, file: File | null): Promise<ActionResult<T>> {
  const body = file ? new FormData() : undefined;
  if (file && body) body.append("file", file, file.name);
  const res = await fetch(`${url}?record=${encodeURIComponent(JSON.stringify(input))}`, { method: "POST", body });
  const json = (await res.json().catch(() => ({}))) as { error?: string; fieldErrors?: Record<string, string[]> } & T;
  if (res.ok) return { ok: true, data: json };
  const status = ([400, 401, 403, 404, 409] as const).find((s) => s === res.status) ?? 500;
  return { ok: false, status, error: json.error ?? `The server answered ${res.status}.`, fieldErrors: json.fieldErrors };
}
