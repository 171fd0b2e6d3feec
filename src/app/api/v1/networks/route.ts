import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { readJson, route } from "@/server/http/errors";
import { createNetwork, listNetworks } from "@/server/networks/service";

export const dynamic = "force-dynamic";

/** GET /api/v1/networks: saved networks of the caller's workspace, newest first (cursor pagination). */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("GET /api/v1/networks", await listNetworks(caller, new URL(req.url).searchParams));
});

/** POST /api/v1/networks `{ name, network }`: saves version 1 of a network. */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  const body = await readJson(req, 2_000_000);
  return reply("POST /api/v1/networks", await createNetwork(caller, body), { status: 201 });
});
