import Link from "next/link";

/** Shown on the sign-in and sign-up pages to someone who is signed in already. */
export function AlreadySignedIn() {
  return (
    <div className="space-y-4" data-testid="already-signed-in">
      <p className="text-body">You are signed in.</p>
      <div className="flex gap-3">
        <Link href="/networks" className="rounded-full bg-wall-700 px-5 py-2 text-body font-semibold text-paper hover:bg-wall-900">
          Go to your networks
        </Link>
        <Link href="/sign-out" className="rounded-full border border-ink/20 px-5 py-2 text-body font-semibold hover:border-wall-500">
          Sign out
        </Link>
      </div>
    </div>
  );
}
