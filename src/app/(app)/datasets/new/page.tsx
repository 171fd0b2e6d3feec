import type { Metadata } from "next";
import { DatasetUpload } from "@/components/data/DatasetUpload";

export const metadata: Metadata = { title: "Upload a dataset" };

export default function NewDatasetPage() {
  return <DatasetUpload />;
}
