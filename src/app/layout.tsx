import type { Metadata } from "next";
import type { ReactNode } from "react";
import { TriskelAuthProvider } from "@/components/auth/TriskelAuthProvider";
import { mono, sans } from "./fonts";
import "./globals.css";

export const metadata: Metadata = {
  title: { default: "Triskel", template: "%s · Triskel" },
  description: "Coherent transport in networks of one-way channels: conductance, spectra and densities of states, computed for you.",
};

export default function RootLayout({ children }: { children: ReactNode }) {
  return (
    <html lang="en" className={`${sans.variable} ${mono.variable}`}>
      <body>
        <TriskelAuthProvider>{children}</TriskelAuthProvider>
      </body>
    </html>
  );
}
