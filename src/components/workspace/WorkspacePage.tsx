"use client";

import { useQuery } from "@tanstack/react-query";
import { when } from "@/lib/units";
import { PageHeader, ErrorNote, Skeleton } from "@/components/ui/Page";
import { CardTable } from "@/components/ui/Table";
import { useMe } from "@/components/shell/useMe";
import { membersQuery } from "@/components/shell/useMemberNames";

export function WorkspacePage() {
  const me = useMe();
  const members = useQuery(membersQuery);
  return (
    <>
      <PageHeader kicker="workspace" title={me.data?.workspace?.name ?? "Workspace"}>
        {me.data?.workspace?.plan === "lab" ? "Lab plan" : "Free plan"} · you are {me.data?.role ? me.data.role.replace("_", " ") : "…"}. API tokens for scripts
        are scoped to this workspace and to one role.
      </PageHeader>
      <h2 className="mb-2 text-lead font-semibold">Members</h2>
      {members.error ? <ErrorNote error={members.error} /> : null}
      {!members.data && !members.error ? <Skeleton /> : null}
      {members.data ? (
        <CardTable label="Members" columns={["Member", "Role", "Joined"]}>
          {members.data.members.map((m) => (
            <tr key={m.userId} className="border-b border-line last:border-0">
              <td className="px-3 py-2">
                {m.name || m.email} <span className="text-caption text-fg-faint">{m.email}</span>
              </td>
              <td className="px-3 py-2">{m.roleLabel}</td>
              <td className="px-3 py-2 tk-num text-caption">{when(m.joinedAt)}</td>
            </tr>
          ))}
        </CardTable>
      ) : null}
    </>
  );
}
