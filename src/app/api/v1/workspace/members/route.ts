import { reply } from "@/server/http/reply";
import { z } from "zod";
import { can, getCaller } from "@/server/auth";
import { ROLES } from "@/shared/permissions";
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

const inviteInput = z
  .object({
    email: z.string().trim().email("must be an e-mail address").max(320),
    role: z.enum(ROLES, { message: `must be one of ${ROLES.join(", ")}` }),
  })
  .strict();

/** POST /api/v1/workspace/members {email, role}: invite by e-mail (201 with the invitation). */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  const parsed = inviteInput.safeParse(await readJson(req, 10_000));
  if (!parsed.success) throw zodToApiError(parsed.error);
  const result = await invite(caller, parsed.data);
  return reply("POST /api/v1/workspace/members", result, { status: 201 });
});
