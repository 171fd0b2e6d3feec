import type { Metadata } from "next";
import { NetworkDetail } from "@/components/network/NetworkPages";

export const metadata: Metadata = { title: "Network" };

export default async function NetworkPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  return <NetworkDetail id={id} />;
}
