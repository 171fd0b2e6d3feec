import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { setSpendCap } from "@/server/billing/subscriptions";
import { readJson, route, zodToApiError } from "@/server/http/errors";
import { spendCapInput } from "@/server/billing/inputs";

export const dynamic = "force-dynamic";

/** PUT /api/v1/billing/spend-cap `{ spendCapUsd: number | null }`: the monthly compute spend cap. */
export const PUT = route(async (req: Request) => {
  const caller = await getCaller(req);
  const parsed = spendCapInput.safeParse(await readJson(req, 10_000));
  if (!parsed.success) throw zodToApiError(parsed.error);
  return reply("PUT /api/v1/billing/spend-cap", await setSpendCap(caller, parsed.data.spendCapUsd));
});
