import { describe, expect, it } from "vitest";
import { afterSignInPath, sameOriginPath, signInUrl } from "@/shared/callback-url";

// Where the browser goes after sign-in. Each refused value is one a browser resolves to another host: WHATWG URL
// (https://url.spec.whatwg.org/) reads "\" as "/" in http(s) URLs and strips tab and newline characters.

const origin = "https://airkeep.example.org";

describe("callback paths after sign-in", () => {
  it.each([
    "/\\evil.example/",
    "/\t/evil.example/",
    "/\n/evil.example/",
    "//evil.example/",
    "https://other.example/board",
    "http:evil.example",
    "/.//evil.example",
    "javascript:alert(1)",
    "board",
    "",
    "/login?callbackUrl=%2Fboard",
  ])("refuses %j", (raw) => {
    expect(sameOriginPath(raw, origin)).toBeNull();
    expect(afterSignInPath(raw, origin)).toBe("/board");
  });

  it("refuses the decoded forms of %09 and %5C too (the login page reads callbackUrl decoded)", () => {
    const params = new URLSearchParams("callbackUrl=/%09/evil.example/&b=/%5Cevil.example/");
    expect(sameOriginPath(params.get("callbackUrl"), origin)).toBeNull();
    expect(sameOriginPath(params.get("b"), origin)).toBeNull();
  });

  it("keeps a deep link with its query string and fragment", () => {
    expect(afterSignInPath("/alarms?alarm=42&site=3#notes", origin)).toBe("/alarms?alarm=42&site=3#notes");
    expect(afterSignInPath("/compressors/7?range=7d")).toBe("/compressors/7?range=7d");
  });

  it("a sign-in link carries the deep link through, encoded, and comes back out whole", () => {
    const link = signInUrl("/alarms?alarm=42&site=3");
    expect(link).toBe("/login?callbackUrl=%2Falarms%3Falarm%3D42%26site%3D3");
    const back = new URL(link, origin).searchParams.get("callbackUrl");
    expect(afterSignInPath(back, origin)).toBe("/alarms?alarm=42&site=3");
    expect(signInUrl("//evil.example/")).toBe("/login");
  });
});
