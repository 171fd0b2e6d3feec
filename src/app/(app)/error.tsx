"use client";

import { useEffect } from "react";

export default function SignedInError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  useEffect(() => {
    console.error(error);
  }, [error]);
  return (
    <div role="alert" className="max-w-xl py-10">
      <p className="font-mono text-micro uppercase tracking-[0.18em] text-danger">error</p>
      <h1 className="mt-2 text-title font-semibold">This page failed to load</h1>
      <p className="mt-2 text-body text-fg-soft">{error.message || "An unexpected error occurred."}</p>
      {error.digest ? <p className="mt-1 font-mono text-caption text-fg-faint">reference {error.digest}</p> : null}
      <button type="button" onClick={reset} className="tk-btn mt-6">
        Try again
      </button>
    </div>
  );
}
