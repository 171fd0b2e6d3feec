import { reply } from "@/server/http/reply";
import { can, getCaller } from "@/server/auth";
import { inviteInput } from "@/server/workspaces/inputs";
import { readJson, route, zodToApiError } from "@/server/http/errors";
import { invite, listInvitations } from "@/server/workspaces/invitations";
import { listMembers, seatUse } from "@/server/workspaces/members";

export const dynamic = "force-dynamic";

/** GET /api/v1/workspace/members: members with roles; open invitations for those who manage members. */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  const members = await listMembers(caller);
  const manages = can(caller.role, "members.seats");
  return reply("GET /api/v1/workspace/members", {
    members,
    invitations: manages ? (await listInvitations(caller)).filter((i) => i.status === "pending") : undefined,
    seats: manages ? await seatUse(caller.workspaceId) : undefined,
  });
});

/** POST /api/v1/workspace/members {email, role}: invite by e-mail (201 with the invitation). */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  const parsed = inviteInput.safeParse(await readJson(req, 10_000));
  if (!parsed.success) throw zodToApiError(parsed.error);
  const result = await invite(caller, parsed.data);
  return reply("POST /api/v1/workspace/members", result, { status: 201 });
});
