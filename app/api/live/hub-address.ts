import { errorJson } from "@/lib/api/route";

// Where browsers reach the live WebSocket hub (run by the ingester on LIVE_HOST:LIVE_PORT), and the
// same-origin check every live-token handler makes before issuing a token.

function firstHeader(request: Request, name: string): string | null {
  return request.headers.get(name)?.split(",")[0]?.trim() || null;
}

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
  const host = firstHeader(request, "x-forwarded-host") ?? firstHeader(request, "host");
  if (host) {
    const proto = firstHeader(request, "x-forwarded-proto") ?? new URL(request.url).protocol.replace(":", "");
    out.add(`${proto}://${host}`);
  }
  return out;
}

/**
 * Refuses a request another site's page made: a foreign Origin header, or a browser's Sec-Fetch-Site saying
 * cross-site. Returns the 403 response, or null when the request may proceed.
 */
export function crossOriginRefusal(request: Request): Response | null {
  const fetchSite = request.headers.get("sec-fetch-site");
  if (fetchSite && fetchSite !== "same-origin" && fetchSite !== "none") {
    return errorJson(403, "Live tokens are given only to Airkeep's own pages.");
  }
  const origin = request.headers.get("origin");
  if (origin && !expectedOrigins(request).has(origin)) {
    return errorJson(403, "Live tokens are given only to Airkeep's own pages.");
  }
  if (!firstHeader(request, "host")) return errorJson(400, "The request has no Host header.");
  return null;
}

/**
 * The hub's WebSocket address as the browser must use it: LIVE_PUBLIC_URL when set (a reverse proxy in front
 * of the hub), otherwise the host name the page was loaded from with LIVE_PORT (default 3001).
 */
export function liveHubUrl(request: Request): string {
  const explicit = process.env.LIVE_PUBLIC_URL;
  if (explicit) return explicit;
  const host = firstHeader(request, "x-forwarded-host") ?? firstHeader(request, "host") ?? "localhost";
  const proto = firstHeader(request, "x-forwarded-proto") ?? new URL(request.url).protocol.replace(":", "");
  const hostname = new URL(`http://${host}`).hostname;
  const port = process.env.LIVE_PORT && /^\d+$/.test(process.env.LIVE_PORT) ? process.env.LIVE_PORT : "3001";
  const bracketed = hostname.includes(":") && !hostname.startsWith("[") ? `[${hostname}]` : hostname;
  return `${proto === "https" ? "wss" : "ws"}://${bracketed}:${port}/live`;
}

export const noStore = { "cache-control": "no-store", "x-content-type-options": "nosniff" } as const;
