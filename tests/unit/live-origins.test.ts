import { describe, expect, it } from "vitest";
import { defaultAllowedOrigins } from "@/lib/ingester/live-hub";

describe("origins the live hub accepts by default", () => {
  it("takes the three loopback spellings of a loopback address as one origin", () => {
    expect(defaultAllowedOrigins({ NEXTAUTH_URL: "http://localhost:3000" })).toEqual([
      "http://localhost:3000",
      "http://127.0.0.1:3000",
      "http://[::1]:3000",
    ]);
    expect(defaultAllowedOrigins({ NEXTAUTH_URL: "http://127.0.0.1:3100" })).toContain("http://localhost:3100");
  });

  it("keeps the port and scheme, and adds nothing for a real host name", () => {
    expect(defaultAllowedOrigins({ NEXTAUTH_URL: "https://localhost:8443/x" })).toContain("https://127.0.0.1:8443");
    expect(defaultAllowedOrigins({ NEXTAUTH_URL: "https://airkeep.example.org" })).toEqual(["https://airkeep.example.org"]);
  });

  it("uses LIVE_ALLOWED_ORIGINS as given when it is set", () => {
    expect(defaultAllowedOrigins({ LIVE_ALLOWED_ORIGINS: "http://a.example, http://b.example", NEXTAUTH_URL: "http://localhost:3000" })).toEqual([
      "http://a.example",
      "http://b.example",
    ]);
  });
});
