import Link from "next/link";

export default function SignedInNotFound() {
  return (
    <div className="max-w-xl py-10">
      <p className="font-mono text-micro uppercase tracking-[0.18em] text-accent">404</p>
      <h1 className="mt-2 text-title font-semibold">Nothing here in this group</h1>
      <p className="mt-2 text-body text-fg-soft">It may have been deleted, or it belongs to another group. Switch group, or start again from your networks.</p>
      <Link href="/networks" className="tk-btn mt-6">
        Go to networks
      </Link>
    </div>
  );
}
