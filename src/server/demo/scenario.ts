/**
 * The demo scenario of product.md: invented people and a fictional lab. Shared by the database
 * seed (scripts/seed.ts) and the sign-in stand-in (fakes/clerk), so both know the same people.
 */
import type { NetworkDefinition } from "@/engine/browser";
import { squareNetwork, triangularNetwork } from "@/shared/networks";
import type { Role } from "@/shared/permissions";

export interface DemoPerson {
  key: "owner" | "billingAdmin" | "researcher" | "researcher2" | "viewer" | "student";
  email: string;
  name: string;
  /** Stable id at the sign-in service (the stand-in uses it; real Clerk would assign its own). */
  clerkUserId: string;
  /** Demo password for the stand-in only. */
  password: string;
}

export const DEMO_PASSWORD = "triskel-demo-2026";

export const DEMO_PEOPLE: DemoPerson[] = [
  { key: "owner", email: "owner@larkspur.example", name: "Ines Okafor", clerkUserId: "user_demo_owner", password: DEMO_PASSWORD },
  { key: "billingAdmin", email: "billing@larkspur.example", name: "Tomas Varga", clerkUserId: "user_demo_billing", password: DEMO_PASSWORD },
  { key: "researcher", email: "researcher@larkspur.example", name: "Mei Lindqvist", clerkUserId: "user_demo_researcher", password: DEMO_PASSWORD },
  { key: "researcher2", email: "postdoc@larkspur.example", name: "Arjun Salgado", clerkUserId: "user_demo_researcher2", password: DEMO_PASSWORD },
  { key: "viewer", email: "viewer@larkspur.example", name: "Hana Brandt", clerkUserId: "user_demo_viewer", password: DEMO_PASSWORD },
  { key: "student", email: "student@fernhill.example", name: "Leo Marchetti", clerkUserId: "user_demo_student", password: DEMO_PASSWORD },
];

export const DEMO_LAB = {
  name: "Larkspur Devices Lab",
  slug: "larkspur-devices-lab",
  clerkOrgId: "org_demo_larkspur",
  plan: "lab" as const,
  /** Seats bought: one per member and one free, so the demo can invite one person before it asks for a seat. */
  seats: 6,
  spendCapUsd: "250.00",
  members: [
    { key: "owner", role: "owner" },
    { key: "billingAdmin", role: "billing_admin" },
    { key: "researcher", role: "researcher" },
    { key: "researcher2", role: "researcher" },
    { key: "viewer", role: "viewer" },
  ] as { key: DemoPerson["key"]; role: Role }[],
};

/** Saved networks of the demo lab (engine schema v1). */
export const DEMO_NETWORKS: { name: string; definition: NetworkDefinition }[] = [
  { name: "Clean 0.11° triangular network", definition: triangularNetwork({ columns: 24, rows: 24 }, { forward: 0.6, left: 0.2, right: 0.2 }) },
  {
    name: "Disordered 0.11° triangular network",
    definition: triangularNetwork(
      { columns: 24, rows: 24 },
      { forward: 0.6, left: 0.2, right: 0.2 },
      {
        transverse: "open",
        disorder: { linkPhaseWidthRad: 6.283185307179586, forwardSpread: 0.05, seed: 7 },
      },
    ),
  },
  {
    name: "Square network at the critical point",
    definition: squareNetwork({ columns: 32, rows: 32 }, 0.5, { disorder: { linkPhaseWidthRad: 6.283185307179586, seed: 11 } }),
  },
];
