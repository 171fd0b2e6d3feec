import type { Metadata } from "next";
import { DatasetsPage } from "@/components/data/DataPages";

export const metadata: Metadata = { title: "Datasets" };

export default function Page() {
  return <DatasetsPage />;
}
