import { errorJson } from "@/lib/api/route";
import { requestOrigin } from "@/lib/web/request-facts";

/** Origins this server answers on: its configured public address and the address the request came to. */
function expectedOrigins(request: Request): Set<string> {
  const out = new Set<string>();
  const configured = process.env.NEXTAUTH_URL;
  if (configured) {
    try {
      out.add(new URL(configured).origin);
    } catch {
      // a malformed NEXTAUTH_URL is reported by next-auth itself
    }
  }
  const own = requestOrigin(request.headers);
  if (own) out.add(own);
  return out;
}

/**
 * Refuses a request another site's page made: a foreign Origin header, or a browser's Sec-Fetch-Site saying
 * cross-site. Returns the 403 response (with `message`), or null when the request may proceed.
 */
export function crossOriginRefusal(request: Request, message: string): Response | null {
  const fetchSite = request.headers.get("sec-fetch-site");
  if (fetchSite && fetchSite !== "same-origin" && fetchSite !== "none") return errorJson(403, message);
  const origin = request.headers.get("origin");
  if (origin && !expectedOrigins(request).has(origin)) return errorJson(403, message);
  return null;
}
