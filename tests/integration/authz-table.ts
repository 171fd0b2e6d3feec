// The authorization matrix: for every route file under src/app/api and every method it exports,
// the status each caller gets. Expectations follow the Roles table of product.md:
//   see work: everyone in the workspace; create work: Owner, Researcher; cancel or delete others'
//   work: Owner; members: Owner (Billing admin: Researcher and Viewer seats only); plan, payment,
//   spend cap, invoices: Owner, Billing admin; the group's billing overview and compute use: Owner,
//   Billing admin, Researcher (a Researcher's usage report holds only their own rows); API tokens:
//   each member their own.
// "other" is a member of another workspace (the student, Owner of a personal workspace): lists
// and creations act in their own workspace (allowed), the lab's objects do not exist for them (404).
// "ok" means the permission check passed: 2xx, or 409 when the object's state refuses the action
// (cancelling a finished run, a portal for a workspace without a customer).

import { LK07_COMPUTATION, LK07_FIT_START, LK07_NETWORK } from "../../src/shared/lk07";
import { datasetForm } from "../support/csv";

export const CALLERS = ["owner", "billingAdmin", "researcher", "viewer", "other", "anonymous", "revoked"] as const;
export type CallerKey = (typeof CALLERS)[number];
export type Expect = "ok" | 401 | 403 | 404 | "public";

/** Objects of the demo lab the matrix points at (created in beforeAll, mostly by the researcher). */
export interface Fixtures {
  networkId: string;
  runId: string;
  sweepId: string;
  datasetId: string;
  fitId: string;
  spendCapUsd: number | null;
  otherSpendCapUsd: number | null;
  /** A fresh object for a destructive call, made for each caller. */
  freshNetwork(): Promise<string>;
  freshResearcherToken(): Promise<string>;
  ownToken(who: CallerKey): Promise<string>;
  freshMember(role: "viewer" | "researcher"): Promise<string>;
  freshInvitation(): Promise<string>;
}

export interface Entry {
  /** Route file directory under src/app/api, e.g. "v1/runs/[id]/cancel". */
  route: string;
  method: "GET" | "POST" | "PUT" | "PATCH" | "DELETE";
  /** The path to call (may create a fresh object for this caller). */
  path(f: Fixtures, who: CallerKey): string | Promise<string>;
  /** JSON body (or a FormData for uploads). */
  body?(f: Fixtures, who: CallerKey): unknown;
  expect: Partial<Record<CallerKey, Expect>>;
}

const SMALL_NETWORK = {
  lattice: "triangular",
  size: { columns: 4, rows: 4 },
  transverse: "periodic",
  twistDegrees: 0.11,
  modeVelocityMps: 1.0e6,
  channelsPerLink: 1,
  node: { forward: 0.6, left: 0.2, right: 0.2 },
};
export const SMALL_RUN = { network: SMALL_NETWORK, computation: { kind: "conductance", energyMeV: 0.4 } };

export function fitBody(datasetId: string) {
  return { datasetId, network: LK07_NETWORK, computation: LK07_COMPUTATION, sweepParameter: "fieldTesla", fit: LK07_FIT_START };
}

const CSV = "B (mT),R (kohm)\n0,12.9\n10,13.1\n20,13.4\n30,13.0\n";
const csvForm = () => datasetForm(CSV, { name: "authz matrix curve", xColumn: "B (mT)", xUnit: "mT", yColumn: "R (kohm)", yUnit: "kohm" }, "authz.csv");

let seq = 0;
const unique = (p: string) => `${p}-${Date.now().toString(36)}-${seq++}@authz.example`;

// Shorthands for the common rows.
const SEE = { owner: "ok", billingAdmin: "ok", researcher: "ok", viewer: "ok" } as const;
const CREATE = { owner: "ok", billingAdmin: 403, researcher: "ok", viewer: 403 } as const;
const BILLING = { owner: "ok", billingAdmin: "ok", researcher: 403, viewer: 403 } as const;
const USAGE = { owner: "ok", billingAdmin: "ok", researcher: "ok", viewer: 403 } as const;
/** Reads of one lab object: the other workspace does not see it. */
const seeObject = { ...SEE, other: 404 } as const;
/** Lists and own-workspace actions: the other workspace acts on its own data. */
const seeList = { ...SEE, other: "ok" } as const;

export const TABLE: Entry[] = [
  // --- health and webhooks: public by design (signatures instead of credentials)
  { route: "v1/health", method: "GET", path: () => "/api/v1/health", expect: { owner: "public" } },
  { route: "v1/openapi.json", method: "GET", path: () => "/api/v1/openapi.json", expect: { owner: "public" } },
  { route: "webhooks/clerk", method: "POST", path: () => "/api/webhooks/clerk", expect: { owner: "public" } },
  { route: "webhooks/stripe", method: "POST", path: () => "/api/webhooks/stripe", expect: { owner: "public" } },
  // --- any other /api path: 404 JSON for everyone, signed in or not (the catch-all route)
  ...(["GET", "POST", "PUT", "PATCH", "DELETE"] as const).map((method): Entry => ({
    route: "[[...rest]]",
    method,
    path: () => "/api/v1/no-such-resource",
    expect: { owner: 404, billingAdmin: 404, researcher: 404, viewer: 404, other: 404, anonymous: 404, revoked: 404 },
  })),

  // --- networks
  { route: "v1/networks", method: "GET", path: () => "/api/v1/networks", expect: seeList },
  {
    route: "v1/networks",
    method: "POST",
    path: () => "/api/v1/networks",
    body: () => ({ name: "authz matrix", network: SMALL_NETWORK }),
    expect: { ...CREATE, other: "ok" },
  },
  { route: "v1/networks/[id]", method: "GET", path: (f) => `/api/v1/networks/${f.networkId}`, expect: seeObject },
  {
    route: "v1/networks/[id]",
    method: "PUT",
    path: (f) => `/api/v1/networks/${f.networkId}`,
    body: () => ({ name: "authz matrix (replaced)", network: SMALL_NETWORK }),
    expect: { ...CREATE, other: 404 },
  },
  {
    route: "v1/networks/[id]",
    method: "PATCH",
    path: (f) => `/api/v1/networks/${f.networkId}`,
    body: () => ({ name: "authz matrix (patched)" }),
    expect: { ...CREATE, other: 404 },
  },
  // The researcher's own network: the Owner may delete it (others' work), the researcher (own) too.
  { route: "v1/networks/[id]", method: "DELETE", path: (f) => f.freshNetwork(), expect: { ...CREATE, other: 404 } },

  // --- runs (creations as dry runs: every check, nothing computed)
  { route: "v1/runs", method: "GET", path: () => "/api/v1/runs", expect: seeList },
  { route: "v1/runs", method: "POST", path: () => "/api/v1/runs?dryRun=true", body: () => SMALL_RUN, expect: { ...CREATE, other: "ok" } },
  { route: "v1/runs/[id]", method: "GET", path: (f) => `/api/v1/runs/${f.runId}`, expect: seeObject },
  { route: "v1/runs/[id]/result.json", method: "GET", path: (f) => `/api/v1/runs/${f.runId}/result.json`, expect: seeObject },
  // The run is the researcher's: cancelling it is the researcher's own or the Owner's right.
  { route: "v1/runs/[id]/cancel", method: "POST", path: (f) => `/api/v1/runs/${f.runId}/cancel`, expect: { ...CREATE, other: 404 } },

  // --- sweeps
  { route: "v1/sweeps", method: "GET", path: () => "/api/v1/sweeps", expect: seeList },
  {
    route: "v1/sweeps",
    method: "POST",
    path: () => "/api/v1/sweeps?dryRun=true",
    body: () => ({ ...SMALL_RUN, name: "authz matrix", axes: [{ parameter: "fieldTesla", from: 0, to: 0.1, points: 2 }] }),
    expect: { ...CREATE, other: "ok" },
  },
  { route: "v1/sweeps/[id]", method: "GET", path: (f) => `/api/v1/sweeps/${f.sweepId}`, expect: seeObject },
  { route: "v1/sweeps/[id]/results.csv", method: "GET", path: (f) => `/api/v1/sweeps/${f.sweepId}/results.csv`, expect: seeObject },
  { route: "v1/sweeps/[id]/cancel", method: "POST", path: (f) => `/api/v1/sweeps/${f.sweepId}/cancel`, expect: { ...CREATE, other: 404 } },

  // --- datasets
  { route: "v1/datasets", method: "GET", path: () => "/api/v1/datasets", expect: seeList },
  { route: "v1/datasets", method: "POST", path: () => "/api/v1/datasets", body: () => csvForm(), expect: { ...CREATE, other: "ok" } },
  { route: "v1/datasets/[id]", method: "GET", path: (f) => `/api/v1/datasets/${f.datasetId}`, expect: seeObject },
  { route: "v1/datasets/[id]/original", method: "GET", path: (f) => `/api/v1/datasets/${f.datasetId}/original`, expect: seeObject },
  // Period analysis computes and stores nothing: a read.
  { route: "v1/datasets/[id]/period", method: "POST", path: (f) => `/api/v1/datasets/${f.datasetId}/period`, body: () => ({}), expect: seeObject },

  // --- fits
  { route: "v1/fits", method: "GET", path: () => "/api/v1/fits", expect: seeList },
  // A fit on the lab's dataset: the other workspace cannot reach the dataset.
  { route: "v1/fits", method: "POST", path: () => "/api/v1/fits", body: (f) => fitBody(f.datasetId), expect: { ...CREATE, other: 404 } },
  { route: "v1/fits", method: "POST", path: () => "/api/v1/fits?dryRun=true", body: (f) => fitBody(f.datasetId), expect: { ...CREATE, other: 404 } },
  { route: "v1/fits/[id]", method: "GET", path: (f) => `/api/v1/fits/${f.fitId}`, expect: seeObject },
  { route: "v1/fits/[id]/export", method: "GET", path: (f) => `/api/v1/fits/${f.fitId}/export`, expect: seeObject },
  { route: "v1/fits/[id]/curve.csv", method: "GET", path: (f) => `/api/v1/fits/${f.fitId}/curve.csv`, expect: seeObject },
  { route: "v1/fits/[id]/profiles.csv", method: "GET", path: (f) => `/api/v1/fits/${f.fitId}/profiles.csv`, expect: seeObject },
  { route: "v1/fits/[id]/cancel", method: "POST", path: (f) => `/api/v1/fits/${f.fitId}/cancel`, expect: { ...CREATE, other: 404 } },

  // --- usage, workspace, tokens
  // A Viewer computes nothing and sees no compute use or billing (product.md Roles).
  { route: "v1/usage", method: "GET", path: () => "/api/v1/usage", expect: { ...USAGE, other: "ok" } },
  { route: "v1/workspace", method: "GET", path: () => "/api/v1/workspace", expect: seeList },
  { route: "v1/tokens", method: "GET", path: () => "/api/v1/tokens", expect: seeList },
  { route: "v1/tokens", method: "POST", path: () => "/api/v1/tokens", body: () => ({ name: "authz matrix" }), expect: seeList },
  // Each caller revokes a token of their own: allowed for every member.
  { route: "v1/tokens/[id]", method: "DELETE", path: async (f, who) => `/api/v1/tokens/${await f.ownToken(who)}`, expect: seeList },

  // --- members and invitations
  { route: "v1/workspace/members", method: "GET", path: () => "/api/v1/workspace/members", expect: seeList },
  // Inviting a Viewer: Owner, and Billing admin (seats); a personal workspace cannot grow (409 = allowed, refused by state).
  {
    route: "v1/workspace/members",
    method: "POST",
    path: () => "/api/v1/workspace/members",
    body: () => ({ email: unique("invitee"), role: "viewer" }),
    expect: { ...BILLING, other: "ok" },
  },
  // Changing a role: Owner only (a Billing admin fills and frees seats, does not change roles).
  {
    route: "v1/workspace/members/[userId]",
    method: "PATCH",
    path: async (f) => `/api/v1/workspace/members/${await f.freshMember("viewer")}`,
    body: () => ({ role: "researcher" }),
    expect: { owner: "ok", billingAdmin: 403, researcher: 403, viewer: 403, other: 404 },
  },
  // Removing a Viewer: Owner, and Billing admin (seats).
  {
    route: "v1/workspace/members/[userId]",
    method: "DELETE",
    path: async (f) => `/api/v1/workspace/members/${await f.freshMember("viewer")}`,
    expect: { ...BILLING, other: 404 },
  },
  { route: "v1/workspace/invitations", method: "GET", path: () => "/api/v1/workspace/invitations", expect: { ...BILLING, other: "ok" } },
  {
    route: "v1/workspace/invitations/[id]",
    method: "DELETE",
    path: async (f) => `/api/v1/workspace/invitations/${await f.freshInvitation()}`,
    expect: { ...BILLING, other: 404 },
  },
  // Accepting needs an invitation token; an unknown one is 404 for every signed-in caller.
  {
    route: "v1/workspace/invitations/accept",
    method: "POST",
    path: () => "/api/v1/workspace/invitations/accept",
    body: () => ({ token: "inv_not-a-real-one" }),
    expect: { owner: 404, billingAdmin: 404, researcher: 404, viewer: 404, other: 404 },
  },

  // --- billing (the other workspace is the student's own free workspace, where they are Owner)
  { route: "v1/billing", method: "GET", path: () => "/api/v1/billing", expect: { ...USAGE, other: "ok" } },
  { route: "v1/billing/invoices", method: "GET", path: () => "/api/v1/billing/invoices", expect: { ...BILLING, other: "ok" } },
  { route: "v1/billing/seats", method: "GET", path: () => "/api/v1/billing/seats", expect: { ...BILLING, other: "ok" } },
  // One seat is below what the demo lab uses (409 after the permission check) and the other workspace has no subscription (409).
  { route: "v1/billing/seats", method: "PUT", path: () => "/api/v1/billing/seats", body: () => ({ seats: 1 }), expect: { ...BILLING, other: "ok" } },
  { route: "v1/billing/seats/sync", method: "POST", path: () => "/api/v1/billing/seats/sync", body: () => ({}), expect: { ...BILLING, other: "ok" } },
  { route: "v1/billing/checkout", method: "POST", path: () => "/api/v1/billing/checkout", body: () => ({}), expect: { ...BILLING, other: "ok" } },
  { route: "v1/billing/portal", method: "POST", path: () => "/api/v1/billing/portal", body: () => ({}), expect: { ...BILLING, other: "ok" } },
  // Setting the cap to its current value (nothing changes for the other tests).
  {
    route: "v1/billing/spend-cap",
    method: "PUT",
    path: () => "/api/v1/billing/spend-cap",
    body: (f, who) => ({ spendCapUsd: who === "other" ? f.otherSpendCapUsd : f.spendCapUsd }),
    expect: { ...BILLING, other: "ok" },
  },
];
