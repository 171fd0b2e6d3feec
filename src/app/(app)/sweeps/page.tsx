import type { Metadata } from "next";
import { SweepsList } from "@/components/sweeps/SweepsList";

export const metadata: Metadata = { title: "Scans" };

export default function SweepsPage() {
  return <SweepsList />;
}
