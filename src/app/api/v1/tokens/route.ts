import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { createToken, createTokenInput, listTokens } from "@/server/auth/apiTokens";
import { readJson, route, zodToApiError } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/** GET /api/v1/tokens: your API tokens in this workspace (never the secret or its hash). */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("GET /api/v1/tokens", { tokens: await listTokens(caller) });
});

/** POST /api/v1/tokens {name, role?}: 201 with the secret, shown this once. */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  const parsed = createTokenInput.safeParse(await readJson(req, 10_000));
  if (!parsed.success) throw zodToApiError(parsed.error);
  const { token, secret } = await createToken(caller, parsed.data);
  return reply("POST /api/v1/tokens", { token, secret, note: "Copy the secret now: Triskel stores only its hash and cannot show it again." }, { status: 201 });
});
