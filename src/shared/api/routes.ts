/**
 * Every JSON endpoint of the REST API and the body of its success answer. The route handlers
 * answer through `reply("GET /api/v1/runs/{id}", body)` (src/server/http/reply.ts), which type-checks
 * the body against this table, and the browser calls `api("GET /api/v1/runs/{id}", { params })`
 * (src/lib/api.ts), which returns this type: one table, read by both sides.
 * tests/unit/api-contract.test.ts checks that every route file is listed here and answers through it.
 * Endpoints that answer with a file (CSV, JSON download) are in FILE_ROUTES.
 */
import type { BillingOverview, CheckoutStart, InvoiceList, PortalLink, SeatsSynced, SeatsView, SpendCapView, UsageReport } from "./billing";
import type { DatasetDetail, DatasetList, DatasetPeriod, DatasetSummary } from "./datasets";
import type { FitCreated, FitDetail, FitDryRun, FitExport, FitList } from "./fits";
import type { NetworkDetail, NetworkList, NetworkView } from "./networks";
import type { RunCreated, RunDetail, RunDryRun, RunList } from "./runs";
import type { SweepCreated, SweepDetail, SweepDryRun, SweepList } from "./sweeps";
import type { HealthReport, TokenCreated, TokenList, TokenRevoked } from "./tokens";
import type { InvitationAccepted, InvitationSent, InvitationView, MemberList, MemberView, WorkspaceDescription } from "./workspace";

export interface ApiRoutes {
  "GET /api/v1/health": HealthReport;

  "GET /api/v1/networks": NetworkList;
  "POST /api/v1/networks": NetworkView;
  "GET /api/v1/networks/{id}": NetworkDetail;
  "PUT /api/v1/networks/{id}": NetworkView;
  "PATCH /api/v1/networks/{id}": NetworkView;
  "DELETE /api/v1/networks/{id}": null;

  "GET /api/v1/runs": RunList;
  /** 202 with the new calculation. */
  "POST /api/v1/runs": RunCreated;
  /** 200: every check and the estimate, nothing written. */
  "POST /api/v1/runs?dryRun=true": RunDryRun;
  "GET /api/v1/runs/{id}": RunDetail;
  "POST /api/v1/runs/{id}/cancel": RunDetail;

  "GET /api/v1/sweeps": SweepList;
  /** 202 with the new scan. */
  "POST /api/v1/sweeps": SweepCreated;
  /** 200: every check and the estimate, nothing written. */
  "POST /api/v1/sweeps?dryRun=true": SweepDryRun;
  "GET /api/v1/sweeps/{id}": SweepDetail;
  "POST /api/v1/sweeps/{id}/cancel": SweepDetail;

  "GET /api/v1/datasets": DatasetList;
  "POST /api/v1/datasets": DatasetSummary;
  "GET /api/v1/datasets/{id}": DatasetDetail;
  "POST /api/v1/datasets/{id}/period": DatasetPeriod;

  "GET /api/v1/fits": FitList;
  "POST /api/v1/fits": FitCreated;
  "POST /api/v1/fits?dryRun=true": FitDryRun;
  "GET /api/v1/fits/{id}": FitDetail;
  "POST /api/v1/fits/{id}/cancel": FitDetail;
  "GET /api/v1/fits/{id}/export": FitExport;

  "GET /api/v1/workspace": WorkspaceDescription;
  "GET /api/v1/workspace/members": MemberList;
  "POST /api/v1/workspace/members": InvitationSent;
  "PATCH /api/v1/workspace/members/{userId}": { member: MemberView };
  "DELETE /api/v1/workspace/members/{userId}": null;
  "GET /api/v1/workspace/invitations": { invitations: InvitationView[] };
  "DELETE /api/v1/workspace/invitations/{id}": { invitation: InvitationView };
  "POST /api/v1/workspace/invitations/accept": InvitationAccepted;

  "GET /api/v1/tokens": TokenList;
  "POST /api/v1/tokens": TokenCreated;
  "DELETE /api/v1/tokens/{id}": TokenRevoked;

  "GET /api/v1/usage": UsageReport;
  "GET /api/v1/billing": BillingOverview;
  "GET /api/v1/billing/seats": SeatsView;
  "PUT /api/v1/billing/seats": SeatsView;
  "POST /api/v1/billing/seats/sync": SeatsSynced;
  "PUT /api/v1/billing/spend-cap": SpendCapView;
  "GET /api/v1/billing/invoices": InvoiceList;
  "POST /api/v1/billing/checkout": CheckoutStart;
  "POST /api/v1/billing/portal": PortalLink;
}

export type ApiRoute = keyof ApiRoutes;
export type ApiResponse<R extends ApiRoute> = ApiRoutes[R];

/** The table's names at run time (the test of route files reads it); the compiler keeps it equal to ApiRoutes. */
export const JSON_ROUTES = [
  "GET /api/v1/health",
  "GET /api/v1/networks",
  "POST /api/v1/networks",
  "GET /api/v1/networks/{id}",
  "PUT /api/v1/networks/{id}",
  "PATCH /api/v1/networks/{id}",
  "DELETE /api/v1/networks/{id}",
  "GET /api/v1/runs",
  "POST /api/v1/runs",
  "POST /api/v1/runs?dryRun=true",
  "GET /api/v1/runs/{id}",
  "POST /api/v1/runs/{id}/cancel",
  "GET /api/v1/sweeps",
  "POST /api/v1/sweeps",
  "POST /api/v1/sweeps?dryRun=true",
  "GET /api/v1/sweeps/{id}",
  "POST /api/v1/sweeps/{id}/cancel",
  "GET /api/v1/datasets",
  "POST /api/v1/datasets",
  "GET /api/v1/datasets/{id}",
  "POST /api/v1/datasets/{id}/period",
  "GET /api/v1/fits",
  "POST /api/v1/fits",
  "POST /api/v1/fits?dryRun=true",
  "GET /api/v1/fits/{id}",
  "POST /api/v1/fits/{id}/cancel",
  "GET /api/v1/fits/{id}/export",
  "GET /api/v1/workspace",
  "GET /api/v1/workspace/members",
  "POST /api/v1/workspace/members",
  "PATCH /api/v1/workspace/members/{userId}",
  "DELETE /api/v1/workspace/members/{userId}",
  "GET /api/v1/workspace/invitations",
  "DELETE /api/v1/workspace/invitations/{id}",
  "POST /api/v1/workspace/invitations/accept",
  "GET /api/v1/tokens",
  "POST /api/v1/tokens",
  "DELETE /api/v1/tokens/{id}",
  "GET /api/v1/usage",
  "GET /api/v1/billing",
  "GET /api/v1/billing/seats",
  "PUT /api/v1/billing/seats",
  "POST /api/v1/billing/seats/sync",
  "PUT /api/v1/billing/spend-cap",
  "GET /api/v1/billing/invoices",
  "POST /api/v1/billing/checkout",
  "POST /api/v1/billing/portal",
] as const satisfies readonly ApiRoute[];
type Unlisted = Exclude<ApiRoute, (typeof JSON_ROUTES)[number]>;
// A compile error here names an endpoint of ApiRoutes missing from JSON_ROUTES.
const everyRouteListed: [Unlisted] extends [never] ? true : Unlisted = true;
void everyRouteListed;

/** Endpoints that answer with a file rather than a JSON body of the table above. */
export const FILE_ROUTES = [
  "GET /api/v1/runs/{id}/result.json",
  "GET /api/v1/sweeps/{id}/results.csv",
  "GET /api/v1/datasets/{id}/original",
  "GET /api/v1/fits/{id}/curve.csv",
  "GET /api/v1/fits/{id}/profiles.csv",
  /** The OpenAPI 3.1 document of this API (no credentials needed). */
  "GET /api/v1/openapi.json",
] as const;

/** The names of the `{…}` segments of a route, e.g. "id" for "GET /api/v1/runs/{id}". */
export type RouteParamNames<R extends string> = R extends `${string}{${infer P}}${infer Rest}` ? P | RouteParamNames<Rest> : never;
export type RouteParams<R extends string> = [RouteParamNames<R>] extends [never] ? Record<string, never> : Record<RouteParamNames<R>, string>;

/** The method and the path of a route, its `{…}` segments filled in (URI-encoded). */
export function routeRequest<R extends string>(route: R, params: Record<string, string> = {}): { method: string; path: string } {
  const space = route.indexOf(" ");
  const method = route.slice(0, space);
  const path = route.slice(space + 1).replace(/\{(\w+)\}/g, (_, name: string) => {
    const v = params[name];
    if (v === undefined) throw new Error(`${route}: the path parameter "${name}" is missing.`);
    return encodeURIComponent(v);
  });
  return { method, path };
}
