import { NextResponse, type NextRequest } from "next/server";
import { liveHubUrl } from "@/lib/web/live-hub-url";
import { contentSecurityPolicy, webSocketOrigin } from "@/lib/web/security-headers";
import { PAGE_PATH_HEADER, signInUrl } from "@/shared/callback-url";

// Every page: a Content-Security-Policy with a fresh nonce, and the page's path for a sign-in that returns to it.
// Signed-out visitors of pages other than sign-in and wall displays go to sign-in; every handler and action still
// checks the session itself.

const OPEN_PAGES = /^\/(login|display)(\/|$)/;

export function proxy(request: NextRequest) {
  const { pathname, search } = request.nextUrl;
  const hasSession =
    request.cookies.has("next-auth.session-token") || request.cookies.has("__Secure-next-auth.session-token");
  if (!hasSession && !OPEN_PAGES.test(pathname)) {
    const url = request.nextUrl.clone();
    url.pathname = "/login";
    url.search = signInUrl(pathname + search).slice("/login".length);
    return NextResponse.redirect(url);
  }

  const nonce = Buffer.from(crypto.randomUUID()).toString("base64");
  const csp = contentSecurityPolicy({
    nonce,
    liveOrigin: process.env.LIVE_PORT === "off" ? null : webSocketOrigin(liveHubUrl(request.headers)),
    dev: process.env.NODE_ENV === "development",
  });
  const headers = new Headers(request.headers);
  headers.set("x-nonce", nonce);
  headers.set("content-security-policy", csp);
  headers.set(PAGE_PATH_HEADER, pathname + search);
  const response = NextResponse.next({ request: { headers } });
  response.headers.set("content-security-policy", csp);
  return response;
}

export const config = {
  matcher: [
    {
      source: "/((?!api|_next/static|_next/image|favicon.ico|fonts|icon|manifest.webmanifest).*)",
      missing: [
        { type: "header", key: "next-router-prefetch" },
        { type: "header", key: "purpose", value: "prefetch" },
      ],
    },
  ],
};
