import { NextResponse } from "next/server";
import { getCaller } from "@/server/auth";
import { createToken, createTokenInput, listTokens } from "@/server/auth/apiTokens";
import { readJson, route, zodToApiError } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/** GET /api/v1/tokens: your API tokens in this workspace (never the secret or its hash). */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return NextResponse.json({ tokens: await listTokens(caller) });
});

/** POST /api/v1/tokens {name, role?}: 201 with the secret, shown this once. */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  const parsed = createTokenInput.safeParse(await readJson(req, 10_000));
  if (!parsed.success) throw zodToApiError(parsed.error);
  const { token, secret } = await createToken(caller, parsed.data);
  return NextResponse.json({ token, secret, note: "Copy the secret now: Triskel stores only its hash and cannot show it again." }, { status: 201 });
});
