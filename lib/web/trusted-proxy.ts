import net from "node:net";
import type { IncomingMessage } from "node:http";

// Run by the web server (lib/web/main.ts) on every request before Next.js sees it: the forwarded headers are
// replaced by what this server itself knows, or by a proxy's word only when TRUST_PROXY names that proxy.

/** Strips the IPv4-mapped prefix a dual-stack socket reports ("::ffff:10.0.0.1" → "10.0.0.1"). */
export function plainAddress(address: string | undefined | null): string | null {
  if (!address) return null;
  const a = address.trim().replace(/^\[|\]$/g, "");
  const v4 = /^::ffff:(\d+\.\d+\.\d+\.\d+)$/i.exec(a);
  const out = v4?.[1] ?? a;
  return net.isIP(out) ? out : null;
}

export type TrustedProxies = { has(address: string): boolean; describe: string };

/**
 * TRUST_PROXY: comma-separated addresses or CIDR ranges of the reverse proxies in front of Airkeep, or `loopback`
 * (127.0.0.0/8 and ::1). Unset or empty: no proxy is trusted and forwarded headers are ignored.
 */
export function trustedProxies(setting: string | undefined): TrustedProxies {
  const list = new net.BlockList();
  const entries = (setting ?? "").split(",").map((s) => s.trim()).filter(Boolean);
  for (const entry of entries) {
    if (entry === "loopback") {
      list.addSubnet("127.0.0.0", 8, "ipv4");
      list.addAddress("::1", "ipv6");
      continue;
    }
    const [addr, bits] = entry.split("/");
    const ip = plainAddress(addr);
    const family = ip ? (net.isIPv6(ip) ? "ipv6" : "ipv4") : null;
    const prefix = bits === undefined ? null : Number(bits);
    if (!ip || !family || (prefix !== null && (!Number.isInteger(prefix) || prefix < 0 || prefix > (family === "ipv4" ? 32 : 128)))) {
      throw new Error(`TRUST_PROXY: "${entry}" is not an IP address, a CIDR range or "loopback".`);
    }
    if (prefix === null) list.addAddress(ip, family);
    else list.addSubnet(ip, prefix, family);
  }
  return {
    has: (address) => {
      const ip = plainAddress(address);
      return ip !== null && list.check(ip, net.isIPv6(ip) ? "ipv6" : "ipv4");
    },
    describe: entries.length ? entries.join(", ") : "none",
  };
}

const listOf = (v: string | string[] | undefined): string[] =>
  (Array.isArray(v) ? v.join(",") : (v ?? "")).split(",").map((s) => s.trim()).filter(Boolean);

const HOST = /^(\[[0-9a-f:.]+\]|[a-z0-9.-]+)(:\d{1,5})?$/i;

export type ForwardedFacts = { address: string; host: string | null; proto: "http" | "https" };

/**
 * The client address, host and protocol of a request. A directly connected client is its socket's address; behind a
 * trusted proxy it is the nearest address in X-Forwarded-For that is not itself a trusted proxy.
 */
export function forwardedFacts(
  peer: string | undefined,
  encrypted: boolean,
  headers: IncomingMessage["headers"],
  trust: TrustedProxies,
): ForwardedFacts {
  const socketAddress = plainAddress(peer) ?? "unknown";
  const ownHost = typeof headers.host === "string" && HOST.test(headers.host) ? headers.host : null;
  const direct: ForwardedFacts = { address: socketAddress, host: ownHost, proto: encrypted ? "https" : "http" };
  if (!trust.has(socketAddress)) return direct;

  let address = socketAddress;
  const chain = listOf(headers["x-forwarded-for"]);
  for (let i = chain.length - 1; i >= 0; i--) {
    const hop = plainAddress(chain[i]);
    if (!hop) break;
    address = hop;
    if (!trust.has(hop)) break;
  }
  const fHost = listOf(headers["x-forwarded-host"])[0];
  const fProto = listOf(headers["x-forwarded-proto"])[0]?.toLowerCase();
  return {
    address,
    host: fHost && HOST.test(fHost) ? fHost : ownHost,
    proto: fProto === "https" || fProto === "http" ? fProto : direct.proto,
  };
}

/** Replaces the request's forwarded headers with the facts, so nothing downstream reads a client-chosen value. */
export function rewriteForwarded(req: IncomingMessage, trust: TrustedProxies): ForwardedFacts {
  const encrypted = "encrypted" in req.socket && Boolean((req.socket as { encrypted?: boolean }).encrypted);
  const facts = forwardedFacts(req.socket.remoteAddress, encrypted, req.headers, trust);
  for (const name of ["x-forwarded-for", "x-forwarded-host", "x-forwarded-proto", "x-forwarded-port", "x-real-ip", "forwarded"]) {
    delete req.headers[name];
  }
  req.headers["x-forwarded-for"] = facts.address;
  if (facts.host) req.headers["x-forwarded-host"] = facts.host;
  req.headers["x-forwarded-proto"] = facts.proto;
  return facts;
}
