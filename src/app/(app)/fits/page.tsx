import type { Metadata } from "next";
import { FitsPage } from "@/components/data/DataPages";

export const metadata: Metadata = { title: "Fits" };

export default function Page() {
  return <FitsPage />;
}
