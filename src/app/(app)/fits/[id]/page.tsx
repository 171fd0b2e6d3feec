import type { Metadata } from "next";
import { FitReport } from "@/components/data/FitReport";

export const metadata: Metadata = { title: "Fit report" };

export default async function FitPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  return <FitReport id={id} />;
}
