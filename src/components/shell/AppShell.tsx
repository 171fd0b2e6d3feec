"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import type { ReactNode } from "react";
import { ROLE_LABELS, type Role } from "@/shared/permissions";
import { SignOutButton } from "@/components/auth/SignOut";
import { Logo } from "./Logo";
import { RememberGroup } from "./lastGroup";
import { ThemeSwitch } from "./ThemeSwitch";
import { WorkspaceSwitcher } from "./WorkspaceSwitcher";
import { canBill, useMe } from "./useMe";

interface NavItem {
  href: string;
  label: string;
  hint: string;
  show?: (role?: Role) => boolean;
}

const NAV: NavItem[] = [
  { href: "/networks", label: "Networks", hint: "descriptions, drawn" },
  { href: "/runs", label: "Calculations", hint: "one computation each" },
  { href: "/sweeps", label: "Scans", hint: "grids over parameters" },
  { href: "/datasets", label: "Datasets", hint: "measured curves" },
  { href: "/fits", label: "Fits", hint: "model to data" },
  { href: "/workspace", label: "Group", hint: "members, API tokens" },
  { href: "/billing", label: "Billing", hint: "plan, seats, spend cap", show: canBill },
];

export function AppShell({ children }: { children: ReactNode }) {
  const pathname = usePathname() ?? "";
  const me = useMe();
  const role = me.data?.role;
  const items = NAV.filter((n) => !n.show || (role ? n.show(role) : false));
  return (
    <div className="min-h-screen lg:grid lg:grid-cols-[15rem_1fr]">
      <a
        href="#main"
        className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-surface focus:px-3 focus:py-1"
      >
        Skip to content
      </a>
      <aside
        data-testid="sidebar"
        className="border-b border-line bg-surface-sunk lg:sticky lg:top-0 lg:h-screen lg:self-start lg:overflow-y-auto lg:border-b-0 lg:border-r"
      >
        <div className="px-4 py-4">
          <Logo href="/networks" className="text-lead" />
        </div>
        <WorkspaceSwitcher />
        <nav aria-label="Main" className="px-2 pb-4">
          <ul className="flex gap-1 overflow-x-auto lg:block lg:space-y-0.5">
            {items.map((n) => {
              const active = pathname === n.href || pathname.startsWith(n.href + "/");
              return (
                <li key={n.href}>
                  <Link
                    href={n.href}
                    aria-current={active ? "page" : undefined}
                    className={
                      `group flex flex-col rounded-field px-3 py-1.5 ` +
                      `${active ? "bg-surface text-fg shadow-card" : "text-fg-soft hover:bg-surface/60 hover:text-fg"}`
                    }
                  >
                    <span className="flex items-center gap-2 text-body font-medium">
                      <span aria-hidden className={`h-1.5 w-1.5 rotate-45 ${active ? "bg-warm" : "bg-line-strong group-hover:bg-accent"}`} />
                      {n.label}
                    </span>
                    <span className="hidden pl-3.5 text-micro text-fg-faint lg:block">{n.hint}</span>
                  </Link>
                </li>
              );
            })}
          </ul>
        </nav>
        <div className="flex flex-wrap items-center gap-x-4 gap-y-3 border-t border-line px-4 py-4 lg:block lg:space-y-3">
          <Link href="/manual" className="hidden text-caption text-accent underline lg:block">
            Model manual
          </Link>
          <Link href="/status" className="hidden text-caption text-accent underline lg:block">
            Service status
          </Link>
          <div className="hidden lg:block">
            <ThemeSwitch />
          </div>
          {me.data?.user ? (
            <p className="text-caption text-fg-faint" data-testid="signed-in-as">
              {me.data.user.name || me.data.user.email}
              {role ? <span className="ml-1 rounded bg-surface px-1 text-micro uppercase tracking-wide text-fg-soft">{ROLE_LABELS[role]}</span> : null}
            </p>
          ) : null}
          <SignOutButton className="tk-btn-quiet" />
        </div>
      </aside>
      <RememberGroup />
      <main id="main" className="min-w-0 px-gutter py-6 lg:px-10">
        {children}
      </main>
    </div>
  );
}
