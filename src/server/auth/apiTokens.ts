/**
 * API tokens of a member for one workspace (product.md: "API tokens: own; Viewers: read-only").
 * The secret is returned once at creation; only its sha256 is stored, lists never show either.
 */
import "@/server/server-only";
import { and, count, desc, eq, isNull, sql } from "drizzle-orm";
import { z } from "zod";
import { env } from "@/env";
import { getDb } from "@/server/db";
import { apiTokens } from "@/server/db/schema";
import { ApiError } from "@/server/http/errors";
import { ROLE_LABELS, ROLES, tokenRolesFor } from "@/shared/permissions";
import { requirePermission, type Caller } from "./index";
import { displayPrefix, hashToken, newTokenSecret } from "./tokens";
import type { TokenView } from "@/shared/api";
export type { TokenView };

export const createTokenInput = z
  .object({
    name: z.string().trim().min(1, "must not be empty").max(80, "must be at most 80 characters"),
    role: z.enum(ROLES, { message: `must be one of ${ROLES.join(", ")}` }).optional(),
  })
  .strict();

const columns = {
  id: apiTokens.id,
  name: apiTokens.name,
  role: apiTokens.role,
  prefix: apiTokens.prefix,
  createdAt: apiTokens.createdAt,
  lastUsedAt: apiTokens.lastUsedAt,
  revokedAt: apiTokens.revokedAt,
};
type Row = { [K in keyof typeof columns]: (typeof apiTokens.$inferSelect)[K] };

function view(r: Row): TokenView {
  return {
    id: r.id,
    name: r.name,
    role: r.role,
    roleLabel: ROLE_LABELS[r.role],
    prefix: r.prefix,
    createdAt: r.createdAt.toISOString(),
    lastUsedAt: r.lastUsedAt?.toISOString() ?? null,
    revokedAt: r.revokedAt?.toISOString() ?? null,
  };
}

export async function createToken(caller: Caller, input: z.infer<typeof createTokenInput>): Promise<{ token: TokenView; secret: string }> {
  requirePermission(caller, "tokens.own");
  const allowed = tokenRolesFor(caller.role);
  const role = input.role ?? caller.role;
  if (!allowed.includes(role)) {
    throw new ApiError(
      "forbidden",
      `role: a token cannot have more rights than its member; your role (${ROLE_LABELS[caller.role]}) allows ${allowed.join(", ")}.`,
      {
        field: "role",
        allowed,
      },
    );
  }
  const secret = newTokenSecret();
  const cap = env().API_TOKENS_PER_MEMBER;
  const row = await getDb().transaction(async (tx) => {
    // One creation at a time per member and workspace, so two at once cannot both pass the cap.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`api_tokens:${caller.workspaceId}:${caller.userId}`}, 0))`);
    const mine = and(eq(apiTokens.workspaceId, caller.workspaceId), eq(apiTokens.userId, caller.userId), isNull(apiTokens.revokedAt));
    const [{ active }] = await tx.select({ active: count() }).from(apiTokens).where(mine);
    if (active >= cap)
      throw new ApiError(
        "conflict",
        `You already have ${active} active API tokens in this group, the most a member may hold (${cap}); ` +
          "revoke one you no longer use first (Group → API tokens, or DELETE /api/v1/tokens/{id}).",
        { limit: cap, active },
      );
    const [created] = await tx
      .insert(apiTokens)
      .values({ workspaceId: caller.workspaceId, userId: caller.userId, name: input.name, role, tokenHash: hashToken(secret), prefix: displayPrefix(secret) })
      .returning(columns);
    return created;
  });
  return { token: view(row), secret };
}

/** The caller's own tokens in this workspace, newest first, revoked ones included. */
export async function listTokens(caller: Caller): Promise<TokenView[]> {
  requirePermission(caller, "tokens.own");
  const rows = await getDb()
    .select(columns)
    .from(apiTokens)
    .where(and(eq(apiTokens.workspaceId, caller.workspaceId), eq(apiTokens.userId, caller.userId)))
    .orderBy(desc(apiTokens.createdAt))
    .limit(500);
  return rows.map(view);
}

export async function revokeToken(caller: Caller, id: string): Promise<TokenView> {
  requirePermission(caller, "tokens.own");
  if (!z.string().uuid().safeParse(id).success) throw new ApiError("not_found", `No API token with id ${id}.`);
  const db = getDb();
  const where = and(eq(apiTokens.id, id), eq(apiTokens.workspaceId, caller.workspaceId), eq(apiTokens.userId, caller.userId));
  const [row] = await db.select(columns).from(apiTokens).where(where);
  if (!row) throw new ApiError("not_found", `No API token with id ${id} among yours in this group.`);
  if (row.revokedAt) return view(row);
  const [updated] = await db.update(apiTokens).set({ revokedAt: new Date() }).where(where).returning(columns);
  return view(updated);
}
