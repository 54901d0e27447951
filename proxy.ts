import { NextResponse, type NextRequest } from "next/server";

// Only redirects the signed-out to the sign-in page; every handler and action checks the session itself.
export function proxy(request: NextRequest) {
  const hasSession =
    request.cookies.has("next-auth.session-token") || request.cookies.has("__Secure-next-auth.session-token");
  if (hasSession) return NextResponse.next();
  const url = request.nextUrl.clone();
  url.pathname = "/login";
  url.search = `?callbackUrl=${encodeURIComponent(request.nextUrl.pathname + request.nextUrl.search)}`;
  return NextResponse.redirect(url);
}

export const config = {
  matcher: ["/((?!api|login|display|_next|favicon.ico|fonts|icon|manifest.webmanifest).*)"],
};
