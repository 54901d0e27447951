import http from "node:http";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { refuseOversizedAction } from "@/lib/web/action-body-limit";
import { clientAddress, markForwardedHeadersChecked, requestOrigin, UNKNOWN_ADDRESS } from "@/lib/web/request-facts";
import { strictTransportSecurity } from "@/lib/web/security-headers";
import { rewriteForwarded, trustedProxies, type TrustedProxies } from "@/lib/web/trusted-proxy";

// The web server's front (lib/web/main.ts) on a real socket: which client address, host and protocol the app sees
// for forged and for proxied forwarded headers, and the 413 for an oversized server-action body.

let trust: TrustedProxies = trustedProxies(undefined);
let server: http.Server;
let base: string;

beforeAll(async () => {
  server = http.createServer((req, res) => {
    const hsts = strictTransportSecurity(rewriteForwarded(req, trust).proto);
    if (hsts) res.setHeader("strict-transport-security", hsts);
    if (refuseOversizedAction(req, res, 1024)) return;
    req.resume();
    req.on("end", () => {
      markForwardedHeadersChecked();
      const headers = new Headers(req.headers as Record<string, string>);
      res.setHeader("content-type", "application/json");
      res.end(JSON.stringify({ address: clientAddress(headers), origin: requestOrigin(headers) }));
    });
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

const ask = async (headers: Record<string, string>) => {
  const res = await fetch(`${base}/api/x`, { headers });
  return { ...((await res.json()) as { address: string; origin: string }), hsts: res.headers.get("strict-transport-security") };
};

describe("forwarded headers", () => {
  it("without TRUST_PROXY, a client's X-Forwarded-For and X-Forwarded-Host are ignored", async () => {
    trust = trustedProxies(undefined);
    const seen = new Set<string>();
    for (let i = 0; i < 5; i++) {
      const r = await ask({ "x-forwarded-for": `198.51.100.${i}`, "x-real-ip": `203.0.113.${i}`, "x-forwarded-host": "evil.example", "x-forwarded-proto": "https" });
      seen.add(r.address);
      expect(r.origin).toBe(`http://127.0.0.1:${new URL(base).port}`);
      // A client claiming HTTPS over plain HTTP gets no HSTS.
      expect(r.hsts).toBeNull();
    }
    // Rotating the header does not rotate the address the limits count by.
    expect([...seen]).toEqual(["127.0.0.1"]);
  });

  it("with TRUST_PROXY naming the proxy, the nearest untrusted hop is the client", async () => {
    trust = trustedProxies("loopback, 10.0.0.0/8");
    const r = await ask({ "x-forwarded-for": "198.51.100.7, 203.0.113.9, 10.1.2.3", "x-forwarded-host": "airkeep.example.org", "x-forwarded-proto": "https" });
    // 10.1.2.3 is a trusted inner proxy; 203.0.113.9 connected to it. The leftmost value is the client's own claim.
    expect(r.address).toBe("203.0.113.9");
    expect(r.origin).toBe("https://airkeep.example.org");
    // HTTPS as the trusted proxy says: HSTS.
    expect(r.hsts).toMatch(/^max-age=\d+/);
  });

  it("a proxy that is not named is not believed", async () => {
    trust = trustedProxies("192.0.2.1");
    const r = await ask({ "x-forwarded-for": "198.51.100.7", "x-forwarded-host": "evil.example" });
    expect(r.address).toBe("127.0.0.1");
    expect(r.origin).not.toContain("evil.example");
  });

  it("refuses a TRUST_PROXY entry it cannot read", () => {
    expect(() => trustedProxies("10.0.0.0/33")).toThrow(/TRUST_PROXY/);
    expect(() => trustedProxies("proxy.example")).toThrow(/TRUST_PROXY/);
  });
});

describe("server-action bodies", () => {
  it("answers 413 for a page POST over the limit, before the app reads it", async () => {
    const res = await fetch(`${base}/board`, { method: "POST", headers: { "next-action": "x" }, body: "x".repeat(4096) });
    expect(res.status).toBe(413);
    const ok = await fetch(`${base}/board`, { method: "POST", headers: { "next-action": "x" }, body: "x".repeat(100) });
    expect(ok.status).toBe(200);
  });
});

describe("in the app without the web server's rewrite", () => {
  it("uses one fixed address, never the client's header", async () => {
    const fresh = await import("@/lib/web/request-facts");
    delete (globalThis as Record<symbol, unknown>)[Symbol.for("airkeep.forwarded-headers-checked")];
    expect(fresh.clientAddress(new Headers({ "x-forwarded-for": "198.51.100.1" }))).toBe(UNKNOWN_ADDRESS);
  });
});
