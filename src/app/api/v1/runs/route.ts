import { NextResponse } from "next/server";
import { getCaller } from "@/server/auth";
import { readJson, route } from "@/server/http/errors";
import { createRun, listRuns } from "@/server/runs/service";

export const dynamic = "force-dynamic";

/** GET /api/v1/runs?status=&kind=&networkId=&sweepId=&includeSweepPoints=&limit=&cursor= */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return NextResponse.json(await listRuns(caller, new URL(req.url).searchParams));
});

/** POST /api/v1/runs `{ network | networkId, networkVersion?, computation }`: 202 with id, status and estimate. */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  const body = await readJson(req, 2_000_000);
  const created = await createRun(caller, body);
  return NextResponse.json(created, { status: 202, headers: { location: `/api/v1/runs/${created.id}` } });
});
