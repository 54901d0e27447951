import { defineConfig } from "@playwright/test";
import { e2e } from "./tests/e2e/env";

export default defineConfig({
  testDir: "tests/e2e",
  fullyParallel: false,
  workers: 1,
  retries: process.env.CI ? 1 : 0,
  timeout: 30_000,
  expect: { timeout: 10_000 },
  reporter: [["list"]],
  use: {
    baseURL: e2e.baseURL,
    trace: "retain-on-failure",
    launchOptions: {
      executablePath: "/usr/bin/chromium",
      args: [
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--no-first-run",
      ],
    },
  },
  webServer: {
    command: "node_modules/.bin/tsx lib/cli/demo.ts --reset --no-simulator",
    url: `${e2e.baseURL}/api/health`,
    timeout: 240_000,
    reuseExistingServer: false,
    stdout: "pipe",
    stderr: "pipe",
    env: {
      PORT: String(e2e.port),
      MQTT_PORT: String(e2e.mqttPort),
      LIVE_PORT: String(e2e.livePort),
      SMTP_PORT: String(e2e.smtpPort),
      S3_PORT: String(e2e.s3Port),
      DATABASE_URL: e2e.databaseUrl,
      NEXTAUTH_URL: e2e.baseURL,
      NEXT_TELEMETRY_DISABLED: "1",
    },
  },
});
