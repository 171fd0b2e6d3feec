import { reply } from "@/server/http/reply";
import { z } from "zod";
import { getCaller } from "@/server/auth";
import { readJson, route, zodToApiError } from "@/server/http/errors";
import { acceptInvitation } from "@/server/workspaces/invitations";

export const dynamic = "force-dynamic";

const input = z.object({ token: z.string().min(8, "must be the token from the invitation link").max(200) }).strict();

/** POST /api/v1/workspace/invitations/accept {token}: the signed-in invitee joins the workspace. */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  const parsed = input.safeParse(await readJson(req, 10_000));
  if (!parsed.success) throw zodToApiError(parsed.error);
  return reply("POST /api/v1/workspace/invitations/accept", await acceptInvitation(caller, parsed.data.token));
});
