import type { Metadata } from "next";
import { SweepsList } from "@/components/sweeps/SweepsList";

export const metadata: Metadata = { title: "Sweeps" };

export default function SweepsPage() {
  return <SweepsList />;
}
