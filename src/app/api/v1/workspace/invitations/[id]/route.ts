import { reply } from "@/server/http/reply";
import { z } from "zod";
import { getCaller } from "@/server/auth";
import { ApiError, route } from "@/server/http/errors";
import { revokeInvitation } from "@/server/workspaces/invitations";

export const dynamic = "force-dynamic";

/** DELETE /api/v1/workspace/invitations/{id}: revoke a pending invitation (its link stops working). */
export const DELETE = route(async (req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  if (!z.string().uuid().safeParse(id).success) throw new ApiError("not_found", `No invitation with id ${id} in this group.`);
  return reply("DELETE /api/v1/workspace/invitations/{id}", { invitation: await revokeInvitation(caller, id) });
});
