"use client";

import { useAuth, useClerk } from "@clerk/nextjs";
import Link from "next/link";
import { useState } from "react";
import { api } from "@/lib/api";
import { FormMessage } from "./formParts";

interface Preview {
  email: string;
  roleLabel: string;
  workspaceName: string;
  status: "pending" | "accepted" | "revoked" | "expired";
}

/** Signed in: accept and switch to the group. Signed out: sign in or create the account first. */
export function AcceptInvitation({ token, preview }: { token: string; preview: Preview }) {
  const { isLoaded, isSignedIn } = useAuth();
  const clerk = useClerk();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const back = `/accept-invitation?token=${encodeURIComponent(token)}`;
  const withEmail = (path: string) => `${path}?redirect_url=${encodeURIComponent(back)}&email=${encodeURIComponent(preview.email)}`;

  if (preview.status !== "pending") {
    return (
      <FormMessage>
        This invitation is {preview.status}. Ask an Owner of {preview.workspaceName} for a new one.
      </FormMessage>
    );
  }

  async function accept() {
    setBusy(true);
    setError(null);
    try {
      const body = await api("POST /api/v1/workspace/invitations/accept", { json: { token } });
      await clerk.setActive({ organization: body.workspace.clerkOrgId });
      // A full page load, so every server component reads the newly active workspace from the session.
      // eslint-disable-next-line @next/next/no-location-assign-relative-destination -- router.push would keep the old workspace's server state
      window.location.assign("/networks");
    } catch (err) {
      setError(err instanceof Error ? err.message : "The invitation could not be accepted; try again.");
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="space-y-5" data-testid="accept-invitation" data-ready={isLoaded ? "yes" : "no"}>
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-2 rounded-card border border-ink/10 bg-paper-raised p-4 text-body">
        <dt className="text-ink-faint">Group</dt>
        <dd className="font-semibold">{preview.workspaceName}</dd>
        <dt className="text-ink-faint">Role</dt>
        <dd>{preview.roleLabel}</dd>
        <dt className="text-ink-faint">For</dt>
        <dd className="font-mono text-caption">{preview.email}</dd>
      </dl>
      {error ? <FormMessage>{error}</FormMessage> : null}
      {!isLoaded ? null : isSignedIn ? (
        <button
          type="button"
          onClick={accept}
          disabled={busy}
          className={
            "inline-flex w-full items-center justify-center rounded-full bg-wall-700 px-5 py-2.5 " +
            "text-body font-semibold text-paper transition hover:bg-wall-900 disabled:cursor-wait disabled:opacity-60"
          }
        >
          {busy ? "Joining…" : `Join ${preview.workspaceName}`}
        </button>
      ) : (
        <div className="space-y-3">
          <Link
            href={withEmail("/sign-up")}
            className="inline-flex w-full items-center justify-center rounded-full bg-wall-700 px-5 py-2.5 text-body font-semibold text-paper hover:bg-wall-900"
          >
            Create an account to join
          </Link>
          <Link
            href={withEmail("/sign-in")}
            className={
              "inline-flex w-full items-center justify-center rounded-full border border-ink/20 px-5 py-2.5 " +
              "text-body font-semibold text-ink hover:border-wall-500"
            }
          >
            I already have an account
          </Link>
        </div>
      )}
    </div>
  );
}
