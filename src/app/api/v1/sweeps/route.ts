import { NextResponse } from "next/server";
import { getCaller } from "@/server/auth";
import { readJson, route } from "@/server/http/errors";
import { createSweep, listSweeps } from "@/server/sweeps/service";

export const dynamic = "force-dynamic";

/** GET /api/v1/sweeps?status=&limit=&cursor= */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return NextResponse.json(await listSweeps(caller, new URL(req.url).searchParams));
});

/** POST /api/v1/sweeps `{ name?, network | networkId, networkVersion?, computation, axes, ensemble? }`: 202. */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  const body = await readJson(req, 2_000_000);
  const created = await createSweep(caller, body);
  return NextResponse.json(created, { status: 202, headers: { location: `/api/v1/sweeps/${created.id}` } });
});
