/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  serverExternalPackages: ["better-sqlite3", "bcryptjs"],
  experimental: {
    serverActions: { bodySizeLimit: "1mb" },
    authInterrupts: true,
  },
};

export default nextConfig;
