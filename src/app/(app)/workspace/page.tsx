import type { Metadata } from "next";
import { WorkspacePage } from "@/components/workspace/WorkspacePage";

export const metadata: Metadata = { title: "Group" };

export default function Page() {
  return <WorkspacePage />;
}
