"use client";

import "./globals.css";
import { PageError } from "@/components/route/route-states";

// Replaces the root layout when it fails itself, so it brings its own html and body.
export default function GlobalError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <html lang="en">
      <body className="min-h-screen p-8 antialiased">
        <title>Airkeep · Error</title>
        <PageError error={error} reset={reset} />
      </body>
    </html>
  );
}
