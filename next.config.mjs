/** Largest server-action body; the web server (lib/web/main.ts) answers larger ones with 413 before Next.js reads them. */
const serverActionBodyLimit = 1024 * 1024;

/** Headers every response carries; the Content-Security-Policy comes from proxy.ts (it needs a nonce per page). */
const securityHeaders = [
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "Referrer-Policy", value: "same-origin" },
  { key: "X-Frame-Options", value: "DENY" },
  { key: "Cross-Origin-Opener-Policy", value: "same-origin" },
];

/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  serverExternalPackages: ["better-sqlite3", "bcryptjs"],
  experimental: {
    serverActions: { bodySizeLimit: serverActionBodyLimit },
    authInterrupts: true,
  },
  async headers() {
    return [{ source: "/:path*", headers: securityHeaders }];
  },
};

export default nextConfig;
