"use client";

export default function ErrorPage({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="max-w-xl" role="alert">
      <h1 className="text-3xl font-bold text-peat-900">Something went wrong</h1>
      <p className="mt-3">
        The page could not be shown; nothing you entered was changed. Try again, and if it keeps happening tell a club
        officer{error.digest ? ` (reference ${error.digest})` : ""}.
      </p>
      <button type="button" onClick={reset} className="mt-4 rounded-md bg-peat-700 px-4 py-2 font-bold text-white">
        Try again
      </button>
    </div>
  );
}
