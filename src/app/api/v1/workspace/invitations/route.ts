import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { route } from "@/server/http/errors";
import { listInvitations } from "@/server/workspaces/invitations";

export const dynamic = "force-dynamic";

/** GET /api/v1/workspace/invitations: every invitation of this workspace with its status. */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("GET /api/v1/workspace/invitations", { invitations: await listInvitations(caller) });
});
