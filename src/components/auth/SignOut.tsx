"use client";

import { useClerk } from "@clerk/nextjs";
import Link from "next/link";
import { useEffect, useState } from "react";

/** Ends the session through Clerk, then goes to the sign-in page (used by /sign-out). */
export function SignOutNow() {
  const clerk = useClerk();
  const [failed, setFailed] = useState<string | null>(null);
  useEffect(() => {
    if (!clerk.loaded) return;
    // Clerk navigates to redirectUrl once the session is ended.
    clerk.signOut({ redirectUrl: "/sign-in" }).catch((err: unknown) => setFailed(err instanceof Error ? err.message : String(err)));
  }, [clerk, clerk.loaded]);
  if (failed) {
    return (
      <p role="alert" className="text-body text-alarm-700">
        Signing out did not finish ({failed}).{" "}
        <Link href="/sign-out" className="underline">
          Try again
        </Link>
        .
      </p>
    );
  }
  return (
    <p className="text-body text-ink-faint" aria-live="polite">
      Signing you out…
    </p>
  );
}

/** A sign-out control for menus and headers (the shell can place it anywhere). */
export function SignOutButton({ className }: { className?: string }) {
  const clerk = useClerk();
  const [busy, setBusy] = useState(false);
  return (
    <button
      type="button"
      data-testid="sign-out"
      disabled={busy}
      className={className ?? "text-caption font-semibold text-ink-soft underline-offset-2 hover:text-wall-700 hover:underline"}
      onClick={async () => {
        setBusy(true);
        try {
          await clerk.signOut({ redirectUrl: "/sign-in" });
        } finally {
          setBusy(false);
        }
      }}
    >
      {busy ? "Signing out…" : "Sign out"}
    </button>
  );
}
