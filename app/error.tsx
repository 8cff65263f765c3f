'use client';

/**
 * What a page shows when preparing it failed on the server (Next's error boundary of the app). The
 * commonest cause in operation is the database restarting, which the proxy answers with 503 before
 * the page starts; one that goes down while a page is being prepared lands here. The server logged
 * the detail; the person gets a sentence and a way to try again.
 */
export default function ErrorPage({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <main className="mx-auto max-w-xl px-6 py-16" role="alert">
      <h1>This page could not be prepared</h1>
      <p className="mt-2 text-[var(--color-muted)]">
        Nothing was changed. If Rhobook could not reach its database, it usually comes back within seconds: try again
        shortly, and tell an administrator if it lasts{error.digest ? ` (mention reference ${error.digest})` : ''}.
      </p>
      <p className="mt-4">
        <button type="button" className="btn" onClick={() => reset()}>
          Try again
        </button>
      </p>
    </main>
  );
}
