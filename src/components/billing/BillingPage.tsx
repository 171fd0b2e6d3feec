"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useSearchParams } from "next/navigation";
import { useState, type ReactNode } from "react";
import { ErrorNote, PageHeader, Skeleton } from "@/components/ui/Page";
import { api } from "@/lib/api";
import type { BillingOverview } from "@/shared/api";
import { SPEND_CAP_USD } from "@/shared/plans";
import { refusalReason, ROLE_LABELS, ROLES, rolesAllowed, type Role } from "@/shared/permissions";
import { useMe } from "@/components/shell/useMe";
import { RefusalNote } from "@/components/ui/Permission";
import { exportCsv } from "@/lib/exportFigure";
import { formatComputeSeconds, formatUsd } from "./CostEstimate";
import { readSpendCap } from "./spendCap";
import { UsageByDayChart } from "./UsageByDayChart";
import { day } from "@/lib/units";

const keys = { overview: ["billing"] as const, usage: ["usage"] as const, invoices: ["billing", "invoices"] as const, seats: ["billing", "seats"] as const };
/** A member's role in words (the usage report carries it as a plain string; a former member has none). */
const roleWord = (role: string | null) => (role && (ROLES as readonly string[]).includes(role) ? ROLE_LABELS[role as Role] : "–");

/** The Billing page; a role that may not see billing (a Viewer) gets the reason in words and nothing is fetched. */
export function BillingPage() {
  const me = useMe();
  if (me.isPending) return <Skeleton lines={6} />;
  const reason = me.data ? refusalReason(me.data.role, "usage.view") : null;
  if (me.data && reason) {
    return (
      <div className="space-y-6" data-testid="billing-refused">
        <PageHeader kicker="Billing" title={me.data.workspace.name} />
        <RefusalNote reason={reason} />
      </div>
    );
  }
  return <BillingContent />;
}

function BillingContent() {
  const client = useQueryClient();
  const params = useSearchParams();
  const returnedFromCheckout = params.get("checkout") === "success";
  const overview = useQuery({
    queryKey: keys.overview,
    queryFn: () => api("GET /api/v1/billing"),
    // Back from Checkout before the payment service's confirmation arrived: look again shortly.
    refetchInterval: (q) => (returnedFromCheckout && q.state.data && !q.state.data.hasSubscription ? 1500 : false),
  });
  const usage = useQuery({ queryKey: keys.usage, queryFn: () => api("GET /api/v1/usage") });
  const canManage = overview.data?.canManageBilling ?? false;
  const invoices = useQuery({
    queryKey: keys.invoices,
    queryFn: () => api("GET /api/v1/billing/invoices"),
    enabled: canManage && Boolean(overview.data?.hasPaymentAccount),
  });
  const refresh = () => void client.invalidateQueries({ queryKey: ["billing"] });

  const upgrade = useMutation({
    mutationFn: () => api("POST /api/v1/billing/checkout"),
    onSuccess: (r) => window.location.assign(r.url),
  });
  const portal = useMutation({
    mutationFn: () => api("POST /api/v1/billing/portal"),
    onSuccess: (r) => window.location.assign(r.url),
  });

  if (overview.isPending) return <Skeleton lines={6} />;
  if (overview.error) return <ErrorNote error={overview.error} title="Billing could not be loaded" />;
  const o = overview.data;
  const names = new Map((usage.data?.members ?? []).filter((m) => m.userId).map((m) => [m.userId!, m.name || m.email || "member"]));

  return (
    <div className="space-y-6" data-testid="billing-page">
      <PageHeader kicker="Billing" title={`${o.workspace.name}`}>
        Plan, seats, spend cap and compute use of this group for {o.period}. Costs are shown before anything is charged.
      </PageHeader>
      {!canManage ? (
        <p className="text-caption text-fg-soft" data-testid="billing-read-only">
          Your role reads this page;{" "}
          {rolesAllowed("billing.manage")
            .map((r) => `${ROLE_LABELS[r]}s`)
            .join(" and ")}{" "}
          change the plan, seats and spend cap and read the invoices.
        </p>
      ) : null}

      {returnedFromCheckout ? (
        <p role="status" className="rounded-card border border-accent/40 bg-accent-soft p-3 text-body text-accent-strong" data-testid="checkout-done">
          Payment received.{" "}
          {o.plan === "lab" ? "This group is on the Lab plan." : "The plan changes as soon as the payment service confirms it; this page updates by itself."}
        </p>
      ) : null}
      {o.planState === "grace" ? (
        <p role="alert" className="rounded-card border border-warm/50 bg-warm-soft p-3 text-body text-warm" data-testid="grace-banner">
          The last payment failed. Lab limits stay until {o.graceEndsAt ? day(o.graceEndsAt) : "the end of the grace period"}; then this group works under Free
          limits. Update the payment details to keep Lab.
        </p>
      ) : null}
      {o.planState === "suspended" ? (
        <p role="alert" className="rounded-card border border-danger/40 bg-danger-soft p-3 text-body text-danger" data-testid="suspended-banner">
          Payment is overdue: this group works under Free limits until the open invoice is paid.
        </p>
      ) : null}

      <div className="grid gap-4 md:grid-cols-3">
        <section className="tk-card space-y-2 p-4" aria-labelledby="plan-h">
          <h2 id="plan-h" className="text-body font-semibold">
            Plan
          </h2>
          <p className="text-title font-semibold" data-testid="plan-label">
            {o.planLabel}
          </p>
          {o.plan === "lab" ? (
            <p
              className={`text-caption font-medium ${o.planState === "active" ? "text-accent-strong" : o.planState === "grace" ? "text-warm" : "text-danger"}`}
              data-testid="plan-state"
            >
              {o.planState === "active"
                ? "Active"
                : o.planState === "grace"
                  ? `Payment failed: Lab limits stay until ${o.graceEndsAt ? day(o.graceEndsAt) : "the grace period ends"}`
                  : "Suspended: Free limits apply until the open invoice is paid"}
            </p>
          ) : null}
          <p className="text-caption text-fg-soft">
            {o.plan === "lab"
              ? `${o.seatPriceUsdPerMonth} USD per seat per month + ${o.computePriceUsdPerHour.toFixed(2)} USD per compute-hour, metered.`
              : `${o.includedComputeSeconds / 60} compute-minutes included each month, no card needed.`}
          </p>
          {canManage ? (
            <div className="flex flex-wrap gap-2 pt-1">
              {/* The API opens Checkout unless the group already has a Lab subscription (startCheckout). */}
              {o.plan === "free" || !o.hasSubscription ? (
                <button type="button" className="tk-btn" onClick={() => upgrade.mutate()} disabled={upgrade.isPending} data-testid="upgrade">
                  {upgrade.isPending
                    ? "Opening checkout…"
                    : `${o.plan === "lab" ? "Start the Lab subscription" : "Upgrade to Lab"} (${Math.max(1, o.members)} × ${o.seatPriceUsdPerMonth} USD / month)`}
                </button>
              ) : null}
              {o.hasPaymentAccount ? (
                <button
                  type="button"
                  className={o.planState === "active" ? "tk-btn-quiet" : "tk-btn"}
                  onClick={() => portal.mutate()}
                  disabled={portal.isPending}
                  data-testid="open-portal"
                >
                  {portal.isPending ? "Opening…" : o.planState === "active" ? "Payment details and invoices" : "Update payment details"}
                </button>
              ) : null}
            </div>
          ) : (
            <p className="text-caption text-fg-faint">The Owner and Billing admins change the plan.</p>
          )}
          {upgrade.error ? <ErrorNote error={upgrade.error} title="Checkout did not open" /> : null}
          {portal.error ? <ErrorNote error={portal.error} title="The portal did not open" /> : null}
        </section>

        <Seats o={o} canManage={canManage} onSaved={refresh} />

        <SpendCap o={o} canManage={canManage} onSaved={refresh} />
      </div>

      <section className="tk-card space-y-3 p-4" aria-labelledby="usage-h">
        <div className="flex flex-wrap items-baseline justify-between gap-2">
          <h2 id="usage-h" className="text-body font-semibold">
            Usage in {o.period}
          </h2>
          <p className="text-caption text-fg-soft" data-testid="usage-total">
            {formatComputeSeconds(o.usedComputeSeconds)}
            {o.plan === "lab" ? ` · ${formatUsd(o.spendUsd)}` : ` of ${o.includedComputeSeconds / 60} included compute-minutes`}
          </p>
        </div>
        {o.reservedComputeSeconds > 0 ? (
          <p className="text-caption text-fg-soft" data-testid="usage-reserved">
            Another {formatComputeSeconds(o.reservedComputeSeconds)}
            {o.plan === "lab" ? ` (${formatUsd(o.reservedUsd)})` : ""} is held by queued and running work: it counts against the{" "}
            {o.plan === "lab" ? "spend cap" : "monthly quota"} until the work finishes, then its measured compute replaces it.
          </p>
        ) : null}
        {usage.isPending ? (
          <Skeleton />
        ) : usage.error ? (
          <ErrorNote error={usage.error} />
        ) : (
          <>
            {usage.data.membersShown === "own" ? (
              <p className="text-caption text-fg-soft" data-testid="usage-own-only">
                Only your own compute use is listed here;{" "}
                {rolesAllowed("usage.members")
                  .map((r) => `${ROLE_LABELS[r]}s`)
                  .join(" and ")}{" "}
                see every member&apos;s. The totals are the group&apos;s.
              </p>
            ) : null}
            <div className="flex justify-end">
              <button
                type="button"
                className="tk-btn-quiet"
                onClick={() =>
                  exportCsv(
                    `usage-members-${usage.data.period}.csv`,
                    ["member", "email", "role", "calculations", "compute_seconds", "cost_usd"],
                    usage.data.members.map((m) => [m.name || m.email || "former member", m.email, roleWord(m.role), m.runs, m.computeSeconds, m.costUsd]),
                    [`Triskel compute use per member, ${o.workspace.name}, period ${usage.data.period}`],
                  )
                }
                data-testid="usage-members-csv"
              >
                Download per member (CSV)
              </button>
            </div>
            <FigureTable testId="usage-members" columns={["Member", "Role"]} numberColumns={["Calculations", "Compute-seconds", "Cost"]}>
              {usage.data.members.map((m) => (
                <tr key={m.userId ?? "former"} className="border-b border-line/60">
                  <td className="py-1.5">{m.name || m.email}</td>
                  <td className="py-1.5 text-fg-soft">{roleWord(m.role)}</td>
                  <td className="py-1.5 text-right tk-num">{m.runs}</td>
                  <td className="py-1.5 text-right tk-num">{m.computeSeconds.toFixed(1)}</td>
                  <td className="py-1.5 text-right tk-num">{formatUsd(m.costUsd)}</td>
                </tr>
              ))}
            </FigureTable>
            <UsageByDayChart period={usage.data.period} days={usage.data.days} names={names} />
          </>
        )}
        {o.plan === "lab" ? (
          <p className="text-caption text-fg-faint" data-testid="meter-status">
            Compute reported to the payment service: {o.meterEvents.sent} calculation{o.meterEvents.sent === 1 ? "" : "s"}; waiting to be reported:{" "}
            {o.meterEvents.pending}
            {o.meterEvents.failed > 0
              ? `; not accepted: ${o.meterEvents.failed}${o.meterEvents.lastError ? ` (last problem: ${o.meterEvents.lastError})` : ""}. Support looks into these; nothing is charged twice`
              : ""}
            .
          </p>
        ) : null}
      </section>

      {canManage && o.hasPaymentAccount ? (
        <section className="tk-card space-y-3 p-4" aria-labelledby="inv-h">
          <h2 id="inv-h" className="text-body font-semibold">
            Invoices
          </h2>
          {invoices.isPending ? (
            <Skeleton />
          ) : invoices.error ? (
            <ErrorNote error={invoices.error} />
          ) : (
            <FigureTable testId="invoices" columns={["Invoice", "Period", "Status"]} numberColumns={["Total"]}>
              {invoices.data.upcoming ? (
                <tr className="border-b border-line/60 text-fg-soft">
                  <td className="py-1.5">Next (estimate so far)</td>
                  <td className="py-1.5">
                    {day(invoices.data.upcoming.periodStart)} – {day(invoices.data.upcoming.periodEnd)}
                  </td>
                  <td className="py-1.5">upcoming</td>
                  <td className="py-1.5 text-right tk-num">{formatUsd(invoices.data.upcoming.totalUsd)}</td>
                </tr>
              ) : null}
              {invoices.data.invoices.map((i) => (
                <tr key={i.id} className="border-b border-line/60">
                  <td className="py-1.5">
                    {i.url ? (
                      <a className="underline" href={i.url}>
                        {i.number ?? i.id}
                      </a>
                    ) : (
                      (i.number ?? i.id)
                    )}
                  </td>
                  <td className="py-1.5">
                    {day(i.periodStart)} – {day(i.periodEnd)}
                  </td>
                  <td className="py-1.5">{i.status}</td>
                  <td className="py-1.5 text-right tk-num">{formatUsd(i.totalUsd)}</td>
                </tr>
              ))}
            </FigureTable>
          )}
        </section>
      ) : null}
    </div>
  );
}

/** A compact table of figures: text columns, then right-aligned number columns; the rows are the children. */
function FigureTable({ testId, columns, numberColumns, children }: { testId: string; columns: string[]; numberColumns: string[]; children: ReactNode }) {
  return (
    <table className="w-full text-body" data-testid={testId}>
      <thead>
        <tr className="border-b border-line text-left text-caption text-fg-faint">
          {columns.map((c) => (
            <th key={c} className="py-1.5 font-medium">
              {c}
            </th>
          ))}
          {numberColumns.map((c) => (
            <th key={c} className="py-1.5 text-right font-medium">
              {c}
            </th>
          ))}
        </tr>
      </thead>
      <tbody>{children}</tbody>
    </table>
  );
}

/**
 * Seats bought and taken. The Owner and Billing admins change the number in two steps: the new
 * monthly seat cost is shown first, and nothing is charged until they confirm.
 */
function Seats({ o, canManage, onSaved }: { o: BillingOverview; canManage: boolean; onSaved: () => void }) {
  const manages = canManage && o.plan === "lab" && o.hasSubscription;
  const seats = useQuery({ queryKey: keys.seats, queryFn: () => api("GET /api/v1/billing/seats"), enabled: manages });
  const [draft, setDraft] = useState("");
  const [review, setReview] = useState<number | null>(null);
  const save = useMutation({
    mutationFn: (n: number) => api("PUT /api/v1/billing/seats", { json: { seats: n } }),
    onSuccess: () => {
      setReview(null);
      setDraft("");
      void seats.refetch();
      onSaved();
    },
  });
  const s = seats.data;
  const wanted = Number(draft);
  const draftError =
    draft.trim() === "" || !s
      ? null
      : !Number.isInteger(wanted)
        ? "Enter a whole number of seats."
        : wanted < s.minimumSeats
          ? `At least ${s.minimumSeats}: every member and open invitation needs a seat.`
          : wanted > s.maxSeats
            ? `At most ${s.maxSeats} seats.`
            : wanted === s.seats
              ? "That is the number you have."
              : null;
  return (
    <section className="tk-card space-y-2 p-4" aria-labelledby="seats-h">
      <h2 id="seats-h" className="text-body font-semibold">
        Seats
      </h2>
      <p className="text-title font-semibold tk-num" data-testid="seats">
        {o.plan === "lab" ? o.seats : "–"}
      </p>
      <p className="text-caption text-fg-soft" data-testid="seats-taken">
        {o.members} member{o.members === 1 ? "" : "s"}
        {s ? `, ${s.pending} open invitation${s.pending === 1 ? "" : "s"}` : ""}
        {o.plan === "lab"
          ? `. Each member and each open invitation takes a seat; inviting past the seats bought asks for a seat first.`
          : ". The Free plan has one member; on the Lab plan each member takes a seat."}
      </p>
      {manages && s ? (
        review === null ? (
          <form
            className="flex items-end gap-2"
            onSubmit={(e) => {
              e.preventDefault();
              if (!draftError && draft.trim() !== "") setReview(wanted);
            }}
          >
            <div>
              <label htmlFor="seat-count" className="tk-label">
                Seats wanted
              </label>
              <input
                id="seat-count"
                className="tk-field mt-1 w-24"
                inputMode="numeric"
                value={draft}
                onChange={(e) => setDraft(e.target.value)}
                placeholder={String(s.seats)}
                aria-describedby="seat-count-note"
                data-testid="seat-count"
              />
            </div>
            <button type="submit" className="tk-btn-quiet" disabled={draft.trim() === "" || draftError !== null} data-testid="seat-review">
              Review cost
            </button>
          </form>
        ) : (
          <div className="space-y-2 rounded-card border border-accent/40 bg-accent-soft p-3" role="status" data-testid="seat-cost">
            <p className="text-body">
              {review} seats × {s.seatPriceUsdPerMonth} USD = <strong className="tk-num">{formatUsd(review * s.seatPriceUsdPerMonth)}</strong> per month (now{" "}
              {formatUsd(s.monthlySeatsUsd)}).
            </p>
            <p className="text-caption text-fg-soft">
              {review > s.seats
                ? `The ${review - s.seats} added seat${review - s.seats === 1 ? " is" : "s are"} charged for the rest of this period, prorated, on the next invoice.`
                : `The ${s.seats - review} seat${s.seats - review === 1 ? "" : "s"} given back are credited for the rest of this period, prorated.`}
            </p>
            <div className="flex gap-2">
              <button type="button" className="tk-btn" onClick={() => save.mutate(review)} disabled={save.isPending} data-testid="seat-confirm">
                {save.isPending ? "Changing…" : `Confirm ${review} seats`}
              </button>
              <button type="button" className="tk-btn-quiet" onClick={() => setReview(null)} disabled={save.isPending}>
                Back
              </button>
            </div>
          </div>
        )
      ) : null}
      {manages && s ? (
        <p id="seat-count-note" className={`text-caption ${draftError ? "text-danger" : "text-fg-faint"}`}>
          {draftError ?? `From ${s.minimumSeats} to ${s.maxSeats} seats.`}
        </p>
      ) : null}
      {seats.error ? <ErrorNote error={seats.error} title="Seats could not be loaded" /> : null}
      {save.error ? <ErrorNote error={save.error} title="Seats not changed" /> : null}
    </section>
  );
}

function SpendCap({ o, canManage, onSaved }: { o: BillingOverview; canManage: boolean; onSaved: () => void }) {
  const [value, setValue] = useState(o.spendCapUsd === null ? "" : String(o.spendCapUsd));
  const [touched, setTouched] = useState(false);
  const [confirmRemove, setConfirmRemove] = useState(false);
  const [saved, setSaved] = useState<string | null>(null);
  const read = readSpendCap(value);
  const save = useMutation({
    mutationFn: (cap: number | null) => api("PUT /api/v1/billing/spend-cap", { json: { spendCapUsd: cap } }),
    onSuccess: (r) => {
      setConfirmRemove(false);
      setTouched(false);
      setSaved(r.spendCapUsd === null ? "The cap is removed." : `The cap is now ${formatUsd(r.spendCapUsd)} per month.`);
      onSaved();
    },
  });
  const problem = touched ? read.problem : null;
  const share = o.spendCapUsd ? Math.min(1, o.spendUsd / o.spendCapUsd) : 0;
  return (
    <section className="tk-card space-y-2 p-4" aria-labelledby="cap-h">
      <h2 id="cap-h" className="text-body font-semibold">
        Spend cap
      </h2>
      <p className="text-title font-semibold tk-num" data-testid="spend-cap">
        {o.spendCapUsd === null ? "No cap" : formatUsd(o.spendCapUsd)}
      </p>
      {o.plan === "free" ? (
        <p className="text-caption text-fg-soft">On the Free plan the included compute-minutes are the limit; a cap matters on the Lab plan.</p>
      ) : null}
      {o.spendCapUsd !== null && o.plan === "lab" ? (
        <div role="img" aria-label={`Spent ${Math.round(share * 100)} % of the cap`}>
          <div className="h-2 rounded-full bg-surface-sunk">
            <div className={`h-2 rounded-full ${share >= 1 ? "bg-danger" : share >= 0.8 ? "bg-warm" : "bg-accent"}`} style={{ width: `${share * 100}%` }} />
          </div>
          <p className="mt-1 text-caption text-fg-soft">
            {formatUsd(o.spendUsd)} spent on compute this month. E-mails go to the Owner and Billing admins at 80 % and 100 %.
          </p>
        </div>
      ) : null}
      {canManage ? (
        confirmRemove ? (
          <div
            className="space-y-2 rounded-card border border-warm/50 bg-warm-soft p-3"
            role="alertdialog"
            aria-labelledby="cap-remove-h"
            data-testid="cap-remove-confirm"
          >
            <p id="cap-remove-h" className="text-body">
              Remove the spend cap of {o.spendCapUsd === null ? "" : formatUsd(o.spendCapUsd)}? Compute is then charged without a monthly limit.
            </p>
            <div className="flex gap-2">
              <button type="button" className="tk-btn" onClick={() => save.mutate(null)} disabled={save.isPending}>
                {save.isPending ? "Removing…" : "Remove the cap"}
              </button>
              <button type="button" className="tk-btn-quiet" onClick={() => setConfirmRemove(false)} disabled={save.isPending}>
                Keep the cap
              </button>
            </div>
          </div>
        ) : (
          <form
            className="space-y-1"
            noValidate
            onSubmit={(e) => {
              e.preventDefault();
              setTouched(true);
              setSaved(null);
              if (read.problem !== null) return;
              if (read.cap === null && o.spendCapUsd !== null) setConfirmRemove(true);
              else save.mutate(read.cap);
            }}
          >
            <div className="flex items-end gap-2">
              <div>
                <label htmlFor="spend-cap" className="tk-label">
                  Monthly cap <span className="font-mono text-micro text-fg-faint">[USD]</span>
                </label>
                <input
                  id="spend-cap"
                  className="tk-field mt-1 w-32"
                  inputMode="decimal"
                  value={value}
                  onChange={(e) => {
                    setValue(e.target.value);
                    setSaved(null);
                  }}
                  onBlur={() => setTouched(true)}
                  placeholder="no cap"
                  aria-invalid={problem ? true : undefined}
                  aria-describedby="spend-cap-note"
                />
              </div>
              <button type="submit" className="tk-btn-quiet" disabled={save.isPending} data-testid="spend-cap-save">
                {save.isPending ? "Saving…" : "Save"}
              </button>
            </div>
            <p
              id="spend-cap-note"
              className={`text-caption ${problem ? "text-danger" : "text-fg-faint"}`}
              role={problem ? "alert" : undefined}
              data-testid="spend-cap-note"
            >
              {problem ?? `From ${SPEND_CAP_USD.min} to ${SPEND_CAP_USD.max.toLocaleString("en-US")} USD a month; empty for no cap.`}
            </p>
          </form>
        )
      ) : (
        <p className="text-caption text-fg-faint">The Owner and Billing admins set the cap.</p>
      )}
      {saved ? (
        <p role="status" className="text-caption text-accent-strong" data-testid="spend-cap-saved">
          {saved}
        </p>
      ) : null}
      {save.error ? <ErrorNote error={save.error} title="Cap not saved" /> : null}
    </section>
  );
}
