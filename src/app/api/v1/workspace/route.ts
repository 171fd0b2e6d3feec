import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { route } from "@/server/http/errors";
import { describeWorkspace } from "@/server/workspaces/members";

export const dynamic = "force-dynamic";

/** GET /api/v1/workspace: the caller's workspace (name, kind, plan), their role and what it allows. */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("GET /api/v1/workspace", await describeWorkspace(caller));
});
