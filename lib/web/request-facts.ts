// The client address, host and protocol of a request as the app may rely on them. Airkeep's web server
// (lib/web/main.ts) rewrites the forwarded headers before Next.js sees a request and marks the process; without that
// mark (e.g. `next dev`), forwarded headers may be client-chosen, so the address is a fixed value and the host is
// the Host header.

const CHECKED = Symbol.for("airkeep.forwarded-headers-checked");

/** Called once by the web server after it installed the header rewrite. */
export function markForwardedHeadersChecked(): void {
  (globalThis as Record<symbol, unknown>)[CHECKED] = true;
}

export function forwardedHeadersChecked(): boolean {
  return (globalThis as Record<symbol, unknown>)[CHECKED] === true;
}

/** Stands for every client when the real address cannot be known. */
export const UNKNOWN_ADDRESS = "unknown";

type HeaderSource = Headers | Record<string, string | string[] | undefined> | undefined | null;

function header(headers: HeaderSource, name: string): string | undefined {
  if (!headers) return undefined;
  if (typeof (headers as Headers).get === "function") return (headers as Headers).get(name) ?? undefined;
  const v = (headers as Record<string, string | string[] | undefined>)[name];
  return Array.isArray(v) ? v[0] : v;
}

const first = (v: string | undefined) => v?.split(",")[0]?.trim() || undefined;

/** The address the per-address sign-in limit and the audit log record. */
export function clientAddress(headers: HeaderSource): string {
  if (!forwardedHeadersChecked()) return UNKNOWN_ADDRESS;
  return first(header(headers, "x-forwarded-for")) ?? UNKNOWN_ADDRESS;
}

/** The host name (and port) the browser used. */
export function requestHost(headers: HeaderSource): string | null {
  const host = forwardedHeadersChecked() ? (first(header(headers, "x-forwarded-host")) ?? first(header(headers, "host"))) : first(header(headers, "host"));
  return host ?? null;
}

/** The protocol the browser used; without the web server's word, the one of NEXTAUTH_URL. */
export function requestProto(headers: HeaderSource): "http" | "https" {
  const stated = forwardedHeadersChecked() ? first(header(headers, "x-forwarded-proto")) : undefined;
  if (stated === "https" || stated === "http") return stated;
  return process.env.NEXTAUTH_URL?.startsWith("https:") ? "https" : "http";
}

/** scheme://host the browser used, or null without a Host header. */
export function requestOrigin(headers: HeaderSource): string | null {
  const host = requestHost(headers);
  return host ? `${requestProto(headers)}://${host}` : null;
}
