import { reply, noContent } from "@/server/http/reply";
import { z } from "zod";
import { getCaller } from "@/server/auth";
import { roleInput } from "@/server/workspaces/inputs";
import { ApiError, readJson, route, zodToApiError } from "@/server/http/errors";
import { changeRole, removeMember } from "@/server/workspaces/members";

export const dynamic = "force-dynamic";

const uuid = z.string().uuid();
function memberId(raw: string): string {
  if (!uuid.safeParse(raw).success) throw new ApiError("not_found", `No member with id ${raw} in this group.`);
  return raw;
}

/** PATCH /api/v1/workspace/members/{userId} {role}: change a member's role (Owner only). */
export const PATCH = route(async (req: Request, ctx: { params: Promise<{ userId: string }> }) => {
  const caller = await getCaller(req);
  const id = memberId((await ctx.params).userId);
  const parsed = roleInput.safeParse(await readJson(req, 10_000));
  if (!parsed.success) throw zodToApiError(parsed.error);
  return reply("PATCH /api/v1/workspace/members/{userId}", { member: await changeRole(caller, id, parsed.data.role) });
});

/** DELETE /api/v1/workspace/members/{userId}: remove a member (their API tokens stop working). */
export const DELETE = route(async (req: Request, ctx: { params: Promise<{ userId: string }> }) => {
  const caller = await getCaller(req);
  const id = memberId((await ctx.params).userId);
  await removeMember(caller, id);
  return noContent("DELETE /api/v1/workspace/members/{userId}");
});
