import { errorJson } from "@/lib/api/route";
import { crossOriginRefusal } from "@/lib/api/same-origin";

/** Live tokens go only to Airkeep's own pages, and name the hub by the page's host (lib/web/live-hub-url). */
export function liveTokenOriginRefusal(request: Request): Response | null {
  const refusal = crossOriginRefusal(request, "Live tokens are given only to Airkeep's own pages.");
  if (refusal) return refusal;
  if (!request.headers.get("host")) return errorJson(400, "The request has no Host header.");
  return null;
}

export const noStore = { "cache-control": "no-store", "x-content-type-options": "nosniff" } as const;
