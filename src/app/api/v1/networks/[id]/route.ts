import { reply, noContent } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { ApiError, readJson, route } from "@/server/http/errors";
import { deleteNetwork, getNetwork, updateNetwork } from "@/server/networks/service";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ id: string }> };

function versionParam(req: Request): number | undefined {
  const raw = new URL(req.url).searchParams.get("version");
  if (raw === null) return undefined;
  // Versions are PostgreSQL integers: at most 2,147,483,647.
  const n = /^\d{1,10}$/.test(raw) ? Number(raw) : NaN;
  if (!Number.isInteger(n) || n < 1 || n > 2_147_483_647)
    throw new ApiError("bad_request", `version: must be a whole number from 1 to 2147483647 (got "${raw.slice(0, 40)}").`, { field: "version" });
  return n;
}

/** GET /api/v1/networks/{id}[?version=N]: the current (or a given) version and the list of versions. */
export const GET = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  return reply("GET /api/v1/networks/{id}", await getNetwork(caller, id, versionParam(req)));
});

/** PUT /api/v1/networks/{id} `{ name?, network }`: replaces the description as a new version. */
export const PUT = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  return reply("PUT /api/v1/networks/{id}", await updateNetwork(caller, id, await readJson(req, 2_000_000), "replace"));
});

/** PATCH /api/v1/networks/{id} `{ name?, network? }`: merges fields into the description (a new version). */
export const PATCH = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  return reply("PATCH /api/v1/networks/{id}", await updateNetwork(caller, id, await readJson(req, 2_000_000), "merge"));
});

/** DELETE /api/v1/networks/{id}: 204, or 409 while runs or sweeps use any of its versions. */
export const DELETE = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  await deleteNetwork(caller, id);
  return noContent("DELETE /api/v1/networks/{id}");
});
