"use client";

import { useOrganizationList } from "@clerk/nextjs";
import { useQueryClient } from "@tanstack/react-query";
import { Component, useState, type ReactNode } from "react";
import { useMe } from "./useMe";

const PERSONAL = "personal";

/**
 * The workspace this session works in: the personal one (no organization selected) or a lab's
 * (a sign-in organization). Switching sets the session's active organization; every API call
 * after that is scoped to the new workspace by the server.
 */
export function WorkspaceSwitcher() {
  const me = useMe();
  const current = me.data?.workspace;
  return (
    <div className="mx-4 mb-3">
      <p id="workspace-label" className="text-micro uppercase tracking-[0.16em] text-fg-faint">
        Workspace
      </p>
      {current ? (
        <SwitchBoundary fallback={<p className="mt-1 truncate text-body font-medium">{current.name}</p>}>
          <OrganizationSelect currentName={current.name} />
        </SwitchBoundary>
      ) : (
        <div className="mt-1 h-8 rounded-field bg-surface/60" aria-hidden />
      )}
      {current?.plan ? <p className="mt-0.5 text-micro text-fg-faint">{current.plan === "lab" ? "Lab plan" : "Free plan"}</p> : null}
    </div>
  );
}

function OrganizationSelect({ currentName }: { currentName: string }) {
  const client = useQueryClient();
  const [busy, setBusy] = useState(false);
  const orgs = useOrganizationList({ userMemberships: { infinite: false, pageSize: 50 } });
  const memberships = orgs.isLoaded ? (orgs.userMemberships?.data ?? []) : [];
  const currentOrg = memberships.find((m) => m.organization.name === currentName);
  if (!orgs.isLoaded || memberships.length === 0) return <p className="mt-1 truncate text-body font-medium">{currentName}</p>;
  const value = currentOrg?.organization.id ?? PERSONAL;
  return (
    <select
      aria-labelledby="workspace-label"
      className="tk-field mt-1 py-1 text-caption"
      value={value}
      disabled={busy}
      onChange={async (e) => {
        setBusy(true);
        try {
          await orgs.setActive?.({ organization: e.target.value === PERSONAL ? null : e.target.value });
          await client.invalidateQueries();
          // A full page load, so every server component reads the newly active workspace from the session.
          // eslint-disable-next-line @next/next/no-location-assign-relative-destination -- router.push would keep the old workspace's server state
          window.location.assign("/networks");
        } finally {
          setBusy(false);
        }
      }}
    >
      <option value={PERSONAL}>{currentOrg ? "Personal workspace" : currentName}</option>
      {memberships.map((m) => (
        <option key={m.organization.id} value={m.organization.id}>
          {m.organization.name}
        </option>
      ))}
    </select>
  );
}

/** Shows the plain workspace name if the sign-in client is not available on this page. */
class SwitchBoundary extends Component<{ fallback: ReactNode; children: ReactNode }, { failed: boolean }> {
  state = { failed: false };
  static getDerivedStateFromError() {
    return { failed: true };
  }
  render() {
    return this.state.failed ? this.props.fallback : this.props.children;
  }
}
