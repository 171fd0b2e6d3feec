import type { Metadata } from "next";
import { FitsList } from "@/components/data/FitsList";

export const metadata: Metadata = { title: "Fits" };

export default function FitsPage() {
  return <FitsList />;
}
