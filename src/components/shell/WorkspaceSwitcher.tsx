"use client";

import { useOrganizationList } from "@clerk/nextjs";
import { useQueryClient } from "@tanstack/react-query";
import { Component, useState, type ReactNode } from "react";
import { rememberGroup } from "./groupChoice";
import { useMe } from "./useMe";

const PERSONAL = "personal";

/**
 * The group this session works in: the personal one (no organization selected) or a lab's (a
 * sign-in organization). Names are shown in full (they wrap, never cut off). Switching sets the
 * session's active organization; every API call after that is scoped to the new group by the server.
 */
export function WorkspaceSwitcher() {
  const me = useMe();
  const current = me.data?.workspace;
  return (
    <div className="mx-4 mb-3">
      <p id="group-label" className="text-micro uppercase tracking-[0.16em] text-fg-faint">
        Group
      </p>
      {current ? (
        <SwitchBoundary fallback={<p className="mt-1 break-words text-body font-medium">{current.name}</p>}>
          <GroupList currentName={current.name} />
        </SwitchBoundary>
      ) : (
        <div className="mt-1 h-8 rounded-field bg-surface/60" aria-hidden />
      )}
      {current?.plan ? <p className="mt-0.5 text-micro text-fg-faint">{current.plan === "lab" ? "Lab plan" : "Free plan"}</p> : null}
    </div>
  );
}

function GroupList({ currentName }: { currentName: string }) {
  const client = useQueryClient();
  const [busy, setBusy] = useState<string | null>(null);
  const orgs = useOrganizationList({ userMemberships: { infinite: false, pageSize: 50 } });
  const memberships = orgs.isLoaded ? (orgs.userMemberships?.data ?? []) : [];
  const currentOrg = memberships.find((m) => m.organization.name === currentName);
  if (!orgs.isLoaded || memberships.length === 0) return <p className="mt-1 break-words text-body font-medium">{currentName}</p>;
  const value = currentOrg?.organization.id ?? PERSONAL;
  const choices = [
    // The personal group under one name whichever group is active (its full name heads the Group page).
    { id: PERSONAL, name: "Personal group" },
    ...memberships.map((m) => ({ id: m.organization.id, name: m.organization.name })),
  ];
  const choose = async (id: string) => {
    if (id === value) return;
    setBusy(id);
    try {
      await orgs.setActive?.({ organization: id === PERSONAL ? null : id });
      rememberGroup(id === PERSONAL ? null : id);
      await client.invalidateQueries();
      // A full page load, so every server component reads the newly active group from the session.
      // eslint-disable-next-line @next/next/no-location-assign-relative-destination -- router.push would keep the old group's server state
      window.location.assign("/networks");
    } finally {
      setBusy(null);
    }
  };
  return (
    <ul aria-labelledby="group-label" className="mt-1 space-y-0.5" data-testid="group-selector">
      {choices.map((c) => {
        const active = c.id === value;
        return (
          <li key={c.id}>
            <button
              type="button"
              aria-pressed={active}
              disabled={busy !== null}
              onClick={() => choose(c.id)}
              className={
                "w-full whitespace-normal break-words rounded-field px-2 py-1 text-left text-caption " +
                (active ? "bg-surface font-semibold text-fg shadow-card" : "text-fg-soft hover:bg-surface/60 hover:text-fg")
              }
            >
              {busy === c.id ? `Switching to ${c.name}…` : c.name}
            </button>
          </li>
        );
      })}
    </ul>
  );
}

/** Shows the plain group name if the sign-in client is not available on this page. */
class SwitchBoundary extends Component<{ fallback: ReactNode; children: ReactNode }, { failed: boolean }> {
  state = { failed: false };
  static getDerivedStateFromError() {
    return { failed: true };
  }
  render() {
    return this.state.failed ? this.props.fallback : this.props.children;
  }
}
