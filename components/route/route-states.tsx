"use client";

import Link from "next/link";

/** Shown while a page's server work runs, so a slow report never leaves a blank screen. */
export function PageLoading() {
  return (
    <div role="status" aria-live="polite" className="mx-auto max-w-7xl space-y-3" data-testid="page-loading">
      <p className="text-sm text-muted">Loading…</p>
      <div className="h-6 w-1/3 animate-pulse rounded bg-panel" />
      <div className="h-32 animate-pulse rounded bg-panel" />
      <div className="h-32 animate-pulse rounded bg-panel" />
    </div>
  );
}

/** A page that failed on the server or in the browser: say so plainly and offer a retry; the digest lets an admin find the log line. */
export function PageError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <section role="alert" className="mx-auto max-w-xl space-y-3 rounded border border-line bg-raised p-5" data-testid="page-error">
      <h1 className="text-xl font-semibold">This page could not be shown</h1>
      <p className="text-muted">
        Something went wrong while it was being prepared. Live data and alarms are not affected; try again, or go back to the board.
      </p>
      {error.digest ? <p className="num text-sm text-muted">Reference {error.digest}</p> : null}
      <div className="flex gap-3">
        <button type="button" onClick={reset} className="rounded border border-ink bg-ink px-3 py-1.5 text-raised">
          Try again
        </button>
        <Link href="/board" className="rounded border border-line px-3 py-1.5">
          Back to the board
        </Link>
      </div>
    </section>
  );
}

export function PageNotFound() {
  return (
    <main className="mx-auto max-w-xl space-y-3 p-8" data-testid="not-found">
      <h1 className="text-2xl font-semibold">Not found</h1>
      <p className="text-muted">There is nothing here, or it is outside the sites you can see.</p>
      <Link href="/board" className="underline">
        Back to the board
      </Link>
    </main>
  );
}
