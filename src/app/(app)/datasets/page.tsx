import type { Metadata } from "next";
import { DatasetsList } from "@/components/data/DatasetsList";

export const metadata: Metadata = { title: "Datasets" };

export default function DatasetsPage() {
  return <DatasetsList />;
}
