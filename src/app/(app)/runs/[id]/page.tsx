import type { Metadata } from "next";
import { RunView } from "@/components/runs/RunView";

export const metadata: Metadata = { title: "Calculation" };

export default async function RunPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  return <RunView id={id} />;
}
