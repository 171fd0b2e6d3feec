/** The JSON bodies the billing endpoints accept (parsed in their route handlers; described in the API document). */
import { z } from "zod";
import { PLANS, SPEND_CAP_USD } from "@/shared/plans";

/** PUT /api/v1/billing/seats `{ seats }`. */
export const seatsInput = z
  .object({
    seats: z
      .number({ message: "seats must be a whole number of seats" })
      .int("seats must be a whole number")
      .min(1, "seats must be at least 1")
      .max(PLANS.lab.maxSeats, `seats must be at most ${PLANS.lab.maxSeats}`),
  })
  .strict();

/** PUT /api/v1/billing/spend-cap `{ spendCapUsd: number | null }`. */
export const spendCapInput = z.object({
  spendCapUsd: z
    .number({ message: "must be a number of USD, or null for no cap" })
    .min(SPEND_CAP_USD.min, `must be at least ${SPEND_CAP_USD.min} USD (or null for no cap)`)
    .max(SPEND_CAP_USD.max, `must be at most ${SPEND_CAP_USD.max.toLocaleString("en-US")} USD`)
    .nullable(),
});
