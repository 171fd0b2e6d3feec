"use client";

import { useQuery } from "@tanstack/react-query";
import { PageHeader, ErrorNote, Skeleton } from "@/components/ui/Page";
import { api } from "@/lib/api";
import { ROLE_LABELS } from "@/shared/permissions";
import { MembersSection } from "./MembersSection";
import { TokensSection } from "./TokensSection";

/** The group (API: workspace): its members, invitations and seats, and the signed-in member's API tokens. */
export function WorkspacePage() {
  const described = useQuery({ queryKey: ["workspace", "description"], queryFn: () => api("GET /api/v1/workspace"), staleTime: 30_000 });
  if (described.error) return <ErrorNote error={described.error} title="This group could not be loaded" />;
  if (!described.data) return <Skeleton lines={6} />;
  const { workspace, member } = described.data;
  return (
    <div className="space-y-10">
      <PageHeader kicker={workspace.kind === "personal" ? "personal group" : "group"} title={workspace.name}>
        {workspace.plan === "lab" ? "Lab plan" : "Free plan"} · you are {ROLE_LABELS[member.role]}. Members, invitations and seats, then your API tokens for
        scripts.
      </PageHeader>
      <MembersSection role={member.role} myUserId={member.id} kind={workspace.kind} />
      <TokensSection role={member.role} myName={member.name || member.email || "you"} />
    </div>
  );
}
