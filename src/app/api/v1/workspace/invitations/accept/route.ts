import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { readJson, route, zodToApiError } from "@/server/http/errors";
import { acceptInvitation } from "@/server/workspaces/invitations";
import { acceptInvitationInput } from "@/server/workspaces/inputs";

export const dynamic = "force-dynamic";

/** POST /api/v1/workspace/invitations/accept {token}: the signed-in invitee joins the workspace. */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  const parsed = acceptInvitationInput.safeParse(await readJson(req, 10_000));
  if (!parsed.success) throw zodToApiError(parsed.error);
  return reply("POST /api/v1/workspace/invitations/accept", await acceptInvitation(caller, parsed.data.token));
});
