import Link from "next/link";
import { Logo } from "./Logo";

const LINKS = [
  { href: "/pricing", label: "Pricing" },
  { href: "/manual", label: "Model manual" },
  { href: "/status", label: "Service status" },
];

/** The header of the public pages (landing, pricing, manual, status): the logo, the site navigation, sign-in and sign-up. */
export function SiteHeader({ current }: { current?: string }) {
  return (
    <header className="flex flex-wrap items-center justify-between gap-4 border-b border-line pb-4">
      <Logo className="text-title" size={30} />
      <nav aria-label="Site" className="flex flex-wrap items-center gap-5 text-body text-fg-soft">
        {LINKS.map((l) => (
          <Link key={l.href} href={l.href} aria-current={current === l.href ? "page" : undefined} className="hover:text-accent aria-[current=page]:text-fg">
            {l.label}
          </Link>
        ))}
        <Link href="/sign-in" className="hover:text-accent">
          Sign in
        </Link>
        <Link href="/sign-up" className="rounded-full bg-accent px-4 py-1.5 text-accent-fg hover:bg-accent-strong">
          Sign up free
        </Link>
      </nav>
    </header>
  );
}
