import type { Metadata } from "next";
import { WorkspacePage } from "@/components/data/DataPages";

export const metadata: Metadata = { title: "Workspace" };

export default function Page() {
  return <WorkspacePage />;
}
