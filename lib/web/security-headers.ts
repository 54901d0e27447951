// The Content-Security-Policy of every page (proxy.ts adds it with a fresh nonce per request; Next.js puts that nonce
// on its own scripts). The other security headers are static and set in next.config.mjs; HSTS is added by the web
// server (lib/web/main.ts) when the request came over HTTPS.

export type CspInput = {
  nonce: string;
  /** Origin of the live WebSocket hub (ws://host:port), when it is another origin than the page. */
  liveOrigin: string | null;
  /** Next.js development mode evaluates code and needs 'unsafe-eval'. */
  dev: boolean;
};

export function contentSecurityPolicy({ nonce, liveOrigin, dev }: CspInput): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${dev ? " 'unsafe-eval'" : ""}`,
    // React writes style attributes (charts, bands): inline styles stay allowed, inline scripts do not.
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self' data:",
    `connect-src 'self'${liveOrigin ? ` ${liveOrigin}` : ""}`,
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
}

/** Strict-Transport-Security, only for a response the browser receives over HTTPS (one year, sub-domains included). */
export function strictTransportSecurity(proto: "http" | "https"): string | null {
  return proto === "https" ? "max-age=31536000; includeSubDomains" : null;
}

/** ws://host:port of a WebSocket URL, or null when it cannot be read. */
export function webSocketOrigin(url: string): string | null {
  try {
    const u = new URL(url);
    return u.protocol === "ws:" || u.protocol === "wss:" ? `${u.protocol}//${u.host}` : null;
  } catch {
    return null;
  }
}
