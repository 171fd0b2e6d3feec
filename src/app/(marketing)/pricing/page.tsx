import type { Metadata } from "next";
import Link from "next/link";
import { SiteHeader } from "@/components/shell/SiteHeader";
import { PLANS } from "@/shared/plans";

export const metadata: Metadata = { title: "Pricing" };

const usd = (n: number) => (n === 0 ? "0 USD" : `${n.toLocaleString("en-US", { maximumFractionDigits: 2 })} USD`);

export default function PricingPage() {
  const { free, lab } = PLANS;
  const rows: [string, string, string][] = [
    [
      "Price",
      usd(free.seatPriceUsdPerMonth),
      `${usd(lab.seatPriceUsdPerMonth)} per seat per month + ${usd(lab.computePriceUsdPerHour)} per compute-hour, metered`,
    ],
    ["Included compute", `${free.includedComputeSeconds / 60} compute-minutes per month`, "none; every compute-second is metered"],
    ["Largest network", `${free.maxCellsPerSide} × ${free.maxCellsPerSide} cells`, `${lab.maxCellsPerSide} × ${lab.maxCellsPerSide} cells`],
    ["Scan points", free.maxSweepPoints.toLocaleString("en-US"), lab.maxSweepPoints.toLocaleString("en-US")],
    [
      "Longest job (estimated; a calculation, one scan point or a whole fit)",
      `${free.maxJobComputeSeconds / 60} compute-minutes`,
      `${lab.maxJobComputeSeconds / 3600} compute-hours`,
    ],
    ["Queue priority", free.queuePriorityLabel, lab.queuePriorityLabel],
    ["Members", String(free.maxMembers), "seats bought"],
  ];
  return (
    <main className="mx-auto max-w-4xl px-gutter py-16">
      <SiteHeader current="/pricing" />
      <h1 className="mt-6 text-display font-semibold">Pricing</h1>
      <p className="mt-4 max-w-2xl text-lead text-fg-soft">
        Pay for the seats of your lab and for the compute-seconds your calculations actually use. Every job shows its estimated compute-seconds and cost before
        it starts; a job over your plan&apos;s limits, free quota or spend cap is refused with a message, never charged.
      </p>
      <table className="mt-10 w-full border-collapse text-left text-body">
        <thead>
          <tr className="border-b border-line">
            <th className="py-3 pr-4 font-medium text-fg-faint" scope="col">
              <span className="sr-only">Feature</span>
            </th>
            <th className="py-3 pr-4 text-lead font-semibold" scope="col">
              {free.label}
            </th>
            <th className="py-3 text-lead font-semibold" scope="col">
              {lab.label}
            </th>
          </tr>
        </thead>
        <tbody>
          {rows.map(([label, a, b]) => (
            <tr key={label} className="border-b border-line">
              <th scope="row" className="py-3 pr-4 font-medium text-fg-soft">
                {label}
              </th>
              <td className="py-3 pr-4">{a}</td>
              <td className="py-3">{b}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <div className="mt-8 flex flex-wrap items-center gap-4">
        <Link href="/sign-up" className="tk-btn" data-testid="pricing-sign-up">
          Sign up: start on {free.label}
        </Link>
        <p className="max-w-xl text-caption text-fg-soft">
          Every account starts with a personal group on the {free.label} plan, no card needed. To move a group to {lab.label}, its Owner or Billing admin
          upgrades it on the group&apos;s Billing page; the price is shown before anything is charged.
        </p>
      </div>
      <p className="mt-6 text-caption text-fg-faint">Demo figures. A compute-second is one CPU second a Triskel worker spends on your calculation.</p>
    </main>
  );
}
