/** API tokens (`/api/v1/tokens`): for scripts; each acts with a role no higher than its creator's. */
import type { Role } from "../permissions";

export interface TokenView {
  id: string;
  name: string;
  role: Role;
  roleLabel: string;
  /** First characters of the secret, to recognise it; not usable. */
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
}

export interface TokenList {
  tokens: TokenView[];
}

/** POST /api/v1/tokens (201): the secret is shown this once. */
export interface TokenCreated {
  token: TokenView;
  secret: string;
  note: string;
}

/** DELETE /api/v1/tokens/{id}. */
export interface TokenRevoked {
  token: TokenView;
}

/** GET /api/v1/health (no sign-in): 200 when the database and the queue answer, else 503. */
export interface HealthReport {
  status: "ok" | "degraded";
  database: ServiceHealth;
  queue: ServiceHealth;
  time: string;
}

export type ServiceHealth = { status: "ok"; latencyMs: number } | { status: "down"; message: string };
