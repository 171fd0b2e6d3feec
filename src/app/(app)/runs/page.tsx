import type { Metadata } from "next";
import { Suspense } from "react";
import { RunsList } from "@/components/runs/RunsList";

export const metadata: Metadata = { title: "Calculations" };

export default function RunsPage() {
  return (
    <Suspense>
      <RunsList />
    </Suspense>
  );
}
