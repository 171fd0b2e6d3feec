import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { revokeToken } from "@/server/auth/apiTokens";
import { route } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/** DELETE /api/v1/tokens/{id}: revoke one of your tokens; it stops working at once. */
export const DELETE = route(async (req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  return reply("DELETE /api/v1/tokens/{id}", { token: await revokeToken(caller, id) });
});
