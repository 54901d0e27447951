import { describe, expect, it } from "vitest";
import { createLiveToken, verifyLiveToken } from "@/lib/live-token";

const SECRET = "test-secret-that-is-long-enough-0123456789";

describe("live WebSocket token", () => {
  it("round-trips a user's site scope", () => {
    const now = 1_750_000_000_000;
    const t = createLiveToken({ userId: 12, siteIds: [3, 1, 3] }, SECRET, now);
    expect(verifyLiveToken(t, SECRET, now + 1_000)).toEqual({
      userId: 12,
      sessionId: null,
      displayLinkId: null,
      siteIds: [1, 3],
      issuedAt: now,
      expiresAt: now + 60_000,
    });
  });

  it("carries the sign-in session it was issued to", () => {
    const t = createLiveToken({ userId: 12, sessionId: "s-123", siteIds: null }, SECRET);
    expect(verifyLiveToken(t, SECRET)).toMatchObject({ userId: 12, sessionId: "s-123", displayLinkId: null });
  });

  it("carries a display link with every site", () => {
    const t = createLiveToken({ displayLinkId: 4, siteIds: null }, SECRET);
    expect(verifyLiveToken(t, SECRET)).toMatchObject({ userId: null, displayLinkId: 4, siteIds: null });
  });

  it("expires after its time to live (60 s by default)", () => {
    const now = 1_750_000_000_000;
    const t = createLiveToken({ userId: 1, siteIds: null }, SECRET, now);
    expect(verifyLiveToken(t, SECRET, now + 59_999)).not.toBeNull();
    expect(verifyLiveToken(t, SECRET, now + 60_000)).toBeNull();
  });

  it("refuses a token signed with another secret, altered, or malformed", () => {
    const t = createLiveToken({ userId: 1, siteIds: [2] }, SECRET);
    expect(verifyLiveToken(t, "another-secret-another-secret-another")).toBeNull();
    const [body, mac] = t.split(".") as [string, string];
    const widened = Buffer.from(
      JSON.stringify({ ...JSON.parse(Buffer.from(body, "base64url").toString()), s: null }),
    ).toString("base64url");
    expect(verifyLiveToken(`${widened}.${mac}`, SECRET)).toBeNull();
    expect(verifyLiveToken(`${body}.${mac.slice(0, -2)}`, SECRET)).toBeNull();
    expect(verifyLiveToken("", SECRET)).toBeNull();
    expect(verifyLiveToken("abc", SECRET)).toBeNull();
    expect(verifyLiveToken(null, SECRET)).toBeNull();
  });

  it("needs a secret", () => {
    expect(() => createLiveToken({ userId: 1, siteIds: null }, "")).toThrow(/NEXTAUTH_SECRET/);
  });
});
