import type { Metadata } from "next";
import { SweepView } from "@/components/sweeps/SweepView";

export const metadata: Metadata = { title: "Scan" };

export default async function SweepPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  return <SweepView id={id} />;
}
