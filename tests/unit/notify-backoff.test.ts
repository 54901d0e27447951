import { describe, expect, it } from "vitest";
import { retryDelayMs } from "@/lib/mail/backoff";
import { fromAddress, mailConfigFromEnv, messageIdDomain } from "@/lib/mail/config";
import { messageIdFor } from "@/lib/mail/message-id";
import { notifyConfigFromEnv } from "@/lib/notify/config";

describe("retry backoff", () => {
  it("doubles from the base and stops at the cap", () => {
    const d = [1, 2, 3, 4, 5, 6, 7, 8].map((a) => retryDelayMs(a, 10_000, 900_000, 0));
    expect(d).toEqual([10_000, 20_000, 40_000, 80_000, 160_000, 320_000, 640_000, 900_000]);
  });

  it("adds at most the jitter fraction, never beyond the cap", () => {
    expect(retryDelayMs(1, 1000, 60_000, 0.1, () => 0.999)).toBeLessThanOrEqual(1100);
    expect(retryDelayMs(1, 1000, 60_000, 0.1, () => 0.999)).toBeGreaterThan(1000);
    expect(retryDelayMs(20, 1000, 60_000, 0.1, () => 0.999)).toBe(60_000);
  });
});

describe("Message-IDs", () => {
  it("are stable for a key, differ between keys and between databases", () => {
    const a = messageIdFor("alarm:12:raise:0:to:3", "abc123", "airkeep.demo");
    expect(a).toBe(messageIdFor("alarm:12:raise:0:to:3", "abc123", "airkeep.demo"));
    expect(a).not.toBe(messageIdFor("alarm:12:raise:1:to:4", "abc123", "airkeep.demo"));
    expect(a).not.toBe(messageIdFor("alarm:12:raise:0:to:3", "def456", "airkeep.demo"));
    expect(a).toMatch(/^<alarm\.12\.raise\.0\.to\.3\.abc123\.[0-9a-f]{16}@airkeep\.demo>$/);
  });

  it("take their domain from MAIL_FROM", () => {
    expect(fromAddress("Airkeep <alarms@airkeep.demo>")).toBe("alarms@airkeep.demo");
    expect(messageIdDomain("alarms@Example.ORG")).toBe("example.org");
    expect(messageIdDomain("no address")).toBe("airkeep.invalid");
  });
});

describe("settings from the environment", () => {
  it("have the documented defaults", () => {
    const mail = mailConfigFromEnv({});
    expect(mail).toMatchObject({ smtpUrl: "smtp://127.0.0.1:2525", useFake: true, fakePort: 2525, from: "Airkeep <alarms@airkeep.demo>" });
    const notify = notifyConfigFromEnv({});
    expect(notify).toMatchObject({ escalateAfterMs: 15 * 60_000, digestThreshold: 5, digestWindowMs: 10 * 60_000, baseUrl: "http://localhost:3000" });
  });

  it("use SMTP_URL as given and refuse nonsense", () => {
    expect(mailConfigFromEnv({ SMTP_URL: "smtp://mail.example.org:25" })).toMatchObject({ smtpUrl: "smtp://mail.example.org:25", useFake: false });
    expect(notifyConfigFromEnv({ ESCALATE_AFTER_MIN: "5", NEXTAUTH_URL: "https://airkeep.example.org/" })).toMatchObject({
      escalateAfterMs: 5 * 60_000,
      baseUrl: "https://airkeep.example.org",
    });
    expect(() => notifyConfigFromEnv({ DIGEST_THRESHOLD: "many" })).toThrow(/DIGEST_THRESHOLD/);
  });
});
