import { SPEND_CAP_USD } from "@/shared/plans";

/** What the spend-cap field says: no cap (empty), a number of USD within SPEND_CAP_USD, or a problem in words. */
export function readSpendCap(text: string): { cap: number | null; problem: null } | { cap: undefined; problem: string } {
  const t = text.trim().replace(/\s+/g, "");
  if (t === "") return { cap: null, problem: null };
  const usd = /^\d+(\.\d+)?$/.test(t) ? Number(t) : NaN;
  if (!Number.isFinite(usd)) return { cap: undefined, problem: "Enter the monthly cap as a number of USD, such as 250, or leave the field empty for no cap." };
  if (usd < SPEND_CAP_USD.min) return { cap: undefined, problem: `The monthly cap must be at least ${SPEND_CAP_USD.min} USD, or empty for no cap.` };
  if (usd > SPEND_CAP_USD.max) return { cap: undefined, problem: `The monthly cap must be at most ${SPEND_CAP_USD.max.toLocaleString("en-US")} USD.` };
  return { cap: Math.round(usd * 100) / 100, problem: null };
}
