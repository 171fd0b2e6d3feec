import type { Metadata } from "next";
import { AcceptInvitation } from "@/components/auth/AcceptInvitation";
import { AuthFrame } from "@/components/auth/AuthFrame";
import { FormMessage } from "@/components/auth/formParts";
import { previewInvitation } from "@/server/workspaces/invitations";

export const metadata: Metadata = { title: "Join a group" };
export const dynamic = "force-dynamic";

export default async function AcceptInvitationPage({ searchParams }: { searchParams: Promise<{ token?: string }> }) {
  const { token = "" } = await searchParams;
  const preview = token ? await previewInvitation(token) : null;
  return (
    <AuthFrame title="Join a group" lead={preview ? `You are invited to ${preview.workspaceName}.` : undefined}>
      {preview ? (
        <AcceptInvitation token={token} preview={preview} />
      ) : (
        <FormMessage>This invitation link is not valid. Check that the whole link was copied, or ask for a new invitation.</FormMessage>
      )}
    </AuthFrame>
  );
}
