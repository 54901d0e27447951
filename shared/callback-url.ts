// Where the browser goes after signing in. Only a path on Airkeep's own origin is accepted, judged by parsing it as
// a URL against that origin (browsers read `/\evil`, `/<tab>/evil` and `//evil` as other hosts), never by prefix.

export const DEFAULT_AFTER_SIGN_IN = "/board";

/** Request header proxy.ts sets to a page's path and query, so a sign-in asked for by the page can return there. */
export const PAGE_PATH_HEADER = "x-airkeep-page";

// Any syntactically valid origin will do when the caller does not know its own: only relative paths can match it.
const PLACEHOLDER_ORIGIN = "http://airkeep.invalid";

/** The same-origin path, query and fragment of `raw`, or null when it leads anywhere else (or back to sign-in). */
export function sameOriginPath(raw: string | null | undefined, origin: string = PLACEHOLDER_ORIGIN): string | null {
  if (!raw || raw.length > 2048 || !raw.startsWith("/")) return null;
  let base: URL;
  let url: URL;
  try {
    base = new URL(origin);
    url = new URL(raw, base);
  } catch {
    return null;
  }
  if (url.origin !== base.origin || url.username || url.password) return null;
  const path = url.pathname + url.search + url.hash;
  // A pathname the parser normalised to `//host` would be read as another host when used as a link.
  if (!path.startsWith("/") || path.startsWith("//") || path.startsWith("/\\")) return null;
  if (url.pathname === "/login" || url.pathname.startsWith("/api/")) return null;
  return path;
}

/** The page to open after signing in: the asked-for same-origin path, or the board. */
export function afterSignInPath(raw: string | null | undefined, origin?: string): string {
  return sameOriginPath(raw, origin) ?? DEFAULT_AFTER_SIGN_IN;
}

/** The sign-in page that returns to `path` (path, query and fragment) afterwards. */
export function signInUrl(path: string | null | undefined): string {
  const back = sameOriginPath(path);
  return back ? `/login?callbackUrl=${encodeURIComponent(back)}` : "/login";
}
