import type { Metadata } from "next";
import { Suspense } from "react";
import { BillingPage } from "@/components/billing/BillingPage";

export const metadata: Metadata = { title: "Billing" };

export default function Billing() {
  return (
    <Suspense>
      <BillingPage />
    </Suspense>
  );
}
