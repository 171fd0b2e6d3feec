/** Billing and usage (`/api/v1/billing`, `/api/v1/usage`). Money in US dollars, time in compute-seconds. */
import type { PlanId } from "../plans";

/** GET /api/v1/billing: everything the Billing page shows at the top. */
export interface BillingOverview {
  workspace: { id: string; name: string; kind: "personal" | "lab" };
  plan: PlanId;
  planLabel: string;
  planState: "active" | "grace" | "suspended";
  /** Limits that apply now (Free limits while suspended). */
  effectivePlan: PlanId;
  graceEndsAt: string | null;
  seats: number;
  members: number;
  seatPriceUsdPerMonth: number;
  computePriceUsdPerHour: number;
  spendCapUsd: number | null;
  /** Billing period, YYYY-MM (UTC). */
  period: string;
  usedComputeSeconds: number;
  /** Held by queued and running work until it finishes (its estimates), counted against the quota and the cap. */
  reservedComputeSeconds: number;
  includedComputeSeconds: number;
  spendUsd: number;
  /** What the reserved compute would cost at the plan's price. */
  reservedUsd: number;
  hasPaymentAccount: boolean;
  hasSubscription: boolean;
  /** Usage records waiting for, sent to or refused by the payment service. */
  meterEvents: { pending: number; sent: number; failed: number; lastError: string | null };
  canManageBilling: boolean;
}

/** GET and PUT /api/v1/billing/seats: seats bought, seats taken and their price. */
export interface SeatsView {
  /** Seats bought (the Lab subscription's seat quantity). */
  seats: number;
  members: number;
  /** Open invitations: each holds a seat until accepted, revoked or expired. */
  pending: number;
  /** The fewest seats allowed now: members + open invitations, at least 1. */
  minimumSeats: number;
  maxSeats: number;
  seatPriceUsdPerMonth: number;
  /** seats x seat price, USD per month (changes within a period are prorated by the payment service). */
  monthlySeatsUsd: number;
}

/** PUT /api/v1/billing/seats body. */
export interface SeatsChange {
  seats: number;
}

/** POST /api/v1/billing/seats/sync. */
export interface SeatsSynced {
  seats: number;
  members: number;
}

/** POST /api/v1/billing/checkout (201): where to pay. */
export interface CheckoutStart {
  url: string;
  sessionId: string;
  seats: number;
}

/** POST /api/v1/billing/portal (201). */
export interface PortalLink {
  url: string;
}

/** PUT /api/v1/billing/spend-cap. */
export interface SpendCapView {
  spendCapUsd: number | null;
}

export interface InvoiceView {
  id: string;
  number: string | null;
  status: string | null;
  totalUsd: number;
  amountDueUsd: number;
  currency: string;
  periodStart: string;
  periodEnd: string;
  createdAt: string;
  url: string | null;
}

/** GET /api/v1/billing/invoices: newest first, and the preview of the next one. */
export interface InvoiceList {
  invoices: InvoiceView[];
  upcoming: InvoiceView | null;
}

export interface MemberUsage {
  userId: string | null;
  name: string;
  email: string | null;
  role: string | null;
  runs: number;
  computeSeconds: number;
  costUsd: number;
}

export interface DayUsage {
  /** YYYY-MM-DD (UTC). */
  date: string;
  userId: string | null;
  computeSeconds: number;
}

/** GET /api/v1/usage?period=YYYY-MM: compute use per member and per day, from the usage ledger. */
export interface UsageReport {
  period: string;
  plan: PlanId;
  computeSeconds: number;
  costUsd: number;
  includedComputeSeconds: number;
  spendCapUsd: number | null;
  /**
   * Whose rows `members` and `days` hold: "all" for an Owner or Billing admin (action
   * `usage.members`), "own" for a Researcher (only their own; the totals stay the group's).
   */
  membersShown: "all" | "own";
  members: MemberUsage[];
  days: DayUsage[];
}
