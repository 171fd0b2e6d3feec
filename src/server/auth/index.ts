import "@/server/server-only";
import { and, eq, isNull } from "drizzle-orm";
import { getDb } from "@/server/db";
import { apiTokens, memberships, workspaces } from "@/server/db/schema";
import { ApiError } from "@/server/http/errors";
import { assertFailedBudgetLeft, consumeMemberBudget, countFailedRequest } from "@/server/http/rate-limit";
import { can, lesserRole, refusalReason, type Action, type Role } from "@/shared/permissions";
import { effectivePlan, type PlanId } from "@/shared/plans";
import { hashToken, looksLikeToken } from "./tokens";

export type { Action, Role } from "@/shared/permissions";

/** Who is calling, in which workspace, with which role. Every server module takes one. */
export interface Caller {
  userId: string;
  workspaceId: string;
  role: Role;
  /** The plan whose limits apply now (effectivePlan: a suspended Lab workspace works under Free). */
  plan: PlanId;
  via: "session" | "token";
  tokenId?: string;
}

/**
 * Resolves the caller of an API request: `Authorization: Bearer <API token>` or the browser
 * session. The one place a route learns its workspace, so no query can forget the scope.
 *
 * Rate limits (src/server/http/rate-limit.ts): a caller who authenticates spends their member
 * budget (shared by all their tokens and their session); a request that fails to (no credentials,
 * a malformed, unknown or revoked token) spends the client address's failed-request budget, and
 * once that is spent a token from that address is refused with 429 before it is looked up, unless
 * this process has seen the token work in the last minutes (so a working script is not locked out
 * by someone else's failures behind the same address).
 */
export async function getCaller(req: Request): Promise<Caller> {
  const header = req.headers.get("authorization");
  if (header) {
    const match = /^Bearer\s+(\S+)$/i.exec(header.trim());
    if (!match) {
      await countFailedRequest(req);
      throw new ApiError("unauthenticated", "Authorization header must be `Bearer <API token>`.");
    }
    const secret = match[1];
    if (!looksLikeToken(secret)) {
      await countFailedRequest(req);
      throw new ApiError("unauthenticated", "That is not a Triskel API token (they start with `trk_`).");
    }
    const hash = hashToken(secret);
    if (!recentlyWorked(hash)) await assertFailedBudgetLeft(req);
    let caller: Caller;
    try {
      caller = await callerFromToken(secret);
    } catch (err) {
      if (err instanceof ApiError && err.code === "unauthenticated") {
        workedAt.delete(hash);
        await countFailedRequest(req);
      }
      throw err;
    }
    rememberWorked(hash);
    await consumeMemberBudget(caller.userId, req.method);
    return caller;
  }
  const fromSession = await (sessionResolver ?? defaultSessionResolver)(req);
  if (fromSession) {
    await consumeMemberBudget(fromSession.userId, req.method);
    return fromSession;
  }
  await countFailedRequest(req);
  throw new ApiError("unauthenticated", "Sign in, or send `Authorization: Bearer <API token>` (create one under Group → API tokens).");
}

/** Hashes of tokens that authenticated in this process, with when (bounded; entries expire). */
const workedAt = new Map<string, number>();
const WORKED_TTL_MS = 10 * 60_000;
const WORKED_MAX = 10_000;
function recentlyWorked(hash: string): boolean {
  const at = workedAt.get(hash);
  return at !== undefined && at > Date.now() - WORKED_TTL_MS;
}
function rememberWorked(hash: string): void {
  workedAt.delete(hash);
  workedAt.set(hash, Date.now());
  if (workedAt.size > WORKED_MAX) workedAt.delete(workedAt.keys().next().value as string);
}

/**
 * The signed-in caller for server components and server actions (no Request at hand), or null
 * when signed out. Pages use it to hide what the role cannot do (`can(caller.role, action)`).
 */
export async function currentCaller(): Promise<Caller | null> {
  return (sessionResolver ?? defaultSessionResolver)(new Request("http://internal/"));
}

/** Clerk's session through @clerk/nextjs (loaded lazily so scripts and tests need no Next runtime). */
const defaultSessionResolver: SessionResolver = async () => {
  const { resolveSession } = await import("./session");
  return resolveSession();
};

/** The sign-in integration registers how a browser session becomes a Caller (src/server/auth/session.ts). */
type SessionResolver = (req: Request) => Promise<Caller | null>;
let sessionResolver: SessionResolver | undefined;
export function registerSessionResolver(resolver: SessionResolver): void {
  sessionResolver = resolver;
}

const lastUsedWrites = new Map<string, number>();

export async function callerFromToken(secret: string): Promise<Caller> {
  if (!looksLikeToken(secret)) throw new ApiError("unauthenticated", "That is not a Triskel API token (they start with `trk_`).");
  const db = getDb();
  const [row] = await db
    .select({
      id: apiTokens.id,
      userId: apiTokens.userId,
      workspaceId: apiTokens.workspaceId,
      role: apiTokens.role,
      revokedAt: apiTokens.revokedAt,
      memberRole: memberships.role,
      plan: workspaces.plan,
      planState: workspaces.planState,
    })
    .from(apiTokens)
    .innerJoin(workspaces, eq(workspaces.id, apiTokens.workspaceId))
    .leftJoin(memberships, and(eq(memberships.workspaceId, apiTokens.workspaceId), eq(memberships.userId, apiTokens.userId)))
    .where(eq(apiTokens.tokenHash, hashToken(secret)))
    .limit(1);
  if (!row) throw new ApiError("unauthenticated", "Unknown API token.");
  if (row.revokedAt) throw new ApiError("unauthenticated", "This API token was revoked; create a new one.");
  if (!row.memberRole) throw new ApiError("unauthenticated", "The member who created this API token is no longer in its group.");
  // Record last use at most once a minute per token.
  const now = Date.now();
  if ((lastUsedWrites.get(row.id) ?? 0) < now - 60_000) {
    lastUsedWrites.set(row.id, now);
    await db
      .update(apiTokens)
      .set({ lastUsedAt: new Date(now) })
      .where(and(eq(apiTokens.id, row.id), isNull(apiTokens.revokedAt)));
  }
  return {
    userId: row.userId,
    workspaceId: row.workspaceId,
    role: lesserRole(row.role, row.memberRole),
    plan: effectivePlan(row.plan, row.planState),
    via: "token",
    tokenId: row.id,
  };
}

/** Throws 403 with a message naming the action and the roles that may do it. */
export function requirePermission(caller: Caller, action: Action): void {
  const reason = refusalReason(caller.role, action);
  if (reason === null) return;
  throw new ApiError("forbidden", reason, {
    action,
    role: caller.role,
  });
}

export { can };
