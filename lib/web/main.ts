import http from "node:http";
import next from "next";
import nextConfig from "../../next.config.mjs";
import { markForwardedHeadersChecked } from "./request-facts";
import { refuseOversizedAction } from "./action-body-limit";
import { strictTransportSecurity } from "./security-headers";
import { rewriteForwarded, trustedProxies } from "./trusted-proxy";

// The web process: Next.js behind a plain Node HTTP server that decides, before Next.js sees a request, which client
// address, host and protocol it has (TRUST_PROXY), answers oversized server-action bodies with 413, and adds HSTS to
// responses served over HTTPS.

const port = Number(process.env.PORT ?? 3000);
const hostname = process.env.HOST ?? "127.0.0.1";
const trust = trustedProxies(process.env.TRUST_PROXY);
const configured = nextConfig.experimental?.serverActions?.bodySizeLimit;
const actionLimit = typeof configured === "number" ? configured : 1024 * 1024;

const app = next({ dev: false, hostname, port, dir: process.cwd() });
await app.prepare();
const handle = app.getRequestHandler();
markForwardedHeadersChecked();

const server = http.createServer((req, res) => {
  const facts = rewriteForwarded(req, trust);
  const hsts = strictTransportSecurity(facts.proto);
  if (hsts) res.setHeader("strict-transport-security", hsts);
  if (refuseOversizedAction(req, res, actionLimit)) return;
  void handle(req, res);
});
server.listen(port, hostname, () => {
  console.log(`[web] listening on http://${hostname}:${port} (trusted proxies: ${trust.describe})`);
});

for (const signal of ["SIGINT", "SIGTERM"] as const) {
  process.once(signal, () => {
    server.close(() => process.exit(0));
    setTimeout(() => process.exit(0), 3000).unref();
  });
}
