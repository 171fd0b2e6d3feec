import type { Metadata } from "next";
import { NewNetwork } from "@/components/network/NetworkPages";

export const metadata: Metadata = { title: "New network" };

export default function NewNetworkPage() {
  return <NewNetwork />;
}
