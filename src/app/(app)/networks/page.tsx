import type { Metadata } from "next";
import { NetworksList } from "@/components/network/NetworksList";

export const metadata: Metadata = { title: "Networks" };

export default function NetworksPage() {
  return <NetworksList />;
}
