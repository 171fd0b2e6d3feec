import { reply } from "@/server/http/reply";
import { z } from "zod";
import { getCaller } from "@/server/auth";
import { setSpendCap } from "@/server/billing/subscriptions";
import { readJson, route, zodToApiError } from "@/server/http/errors";
import { SPEND_CAP_USD } from "@/shared/plans";

export const dynamic = "force-dynamic";

const Body = z.object({
  spendCapUsd: z
    .number({ message: "must be a number of USD, or null for no cap" })
    .min(SPEND_CAP_USD.min, `must be at least ${SPEND_CAP_USD.min} USD (or null for no cap)`)
    .max(SPEND_CAP_USD.max, `must be at most ${SPEND_CAP_USD.max.toLocaleString("en-US")} USD`)
    .nullable(),
});

/** PUT /api/v1/billing/spend-cap `{ spendCapUsd: number | null }`: the monthly compute spend cap. */
export const PUT = route(async (req: Request) => {
  const caller = await getCaller(req);
  const parsed = Body.safeParse(await readJson(req, 10_000));
  if (!parsed.success) throw zodToApiError(parsed.error);
  return reply("PUT /api/v1/billing/spend-cap", await setSpendCap(caller, parsed.data.spendCapUsd));
});
