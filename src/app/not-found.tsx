import Link from "next/link";

export default function NotFound() {
  return (
    <main className="mx-auto max-w-xl px-gutter py-24">
      <p className="font-mono text-caption uppercase tracking-widest text-wall-700">404</p>
      <h1 className="mt-2 text-title font-semibold">No such page</h1>
      <p className="mt-3 text-body text-ink-soft">The address may be mistyped, or what it pointed to was deleted or belongs to another group.</p>
      <Link href="/" className="mt-6 inline-block text-wall-700">
        Back to Triskel
      </Link>
    </main>
  );
}
