import "../../server-only";
import { sql } from "drizzle-orm";
import { index, integer, numeric, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";

/** Member roles, product.md "Roles". */
export const memberRole = pgEnum("member_role", ["owner", "billing_admin", "researcher", "viewer"]);
/** Plans, product.md "Plans"; figures live in src/shared/plans.ts. */
export const planName = pgEnum("plan_name", ["free", "lab"]);
export const workspaceKind = pgEnum("workspace_kind", ["personal", "lab"]);
/** Billing state of a workspace: `grace` after a failed payment, then back to Free limits. */
export const planState = pgEnum("plan_state", ["active", "grace", "suspended"]);

export const users = pgTable("users", {
  id: uuid("id").primaryKey().defaultRandom(),
  /** Id of the user at the sign-in service (Clerk `user_...`). */
  clerkUserId: text("clerk_user_id").unique(),
  email: text("email").notNull().unique(),
  name: text("name").notNull().default(""),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});

export const workspaces = pgTable("workspaces", {
  id: uuid("id").primaryKey().defaultRandom(),
  name: text("name").notNull(),
  slug: text("slug").notNull().unique(),
  kind: workspaceKind("kind").notNull().default("lab"),
  /** Id of the organization at the sign-in service (Clerk `org_...`); null for personal ones. */
  clerkOrgId: text("clerk_org_id").unique(),
  plan: planName("plan").notNull().default("free"),
  planState: planState("plan_state").notNull().default("active"),
  /** Monthly spend cap in USD set by a Billing admin; null means no cap. */
  spendCapUsd: numeric("spend_cap_usd", { precision: 12, scale: 2 }),
  /** Number of paid seats on the Lab plan. */
  seats: integer("seats").notNull().default(0),
  stripeCustomerId: text("stripe_customer_id").unique(),
  stripeSubscriptionId: text("stripe_subscription_id").unique(),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});

export const memberships = pgTable(
  "memberships",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    workspaceId: uuid("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    role: memberRole("role").notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("memberships_workspace_user").on(t.workspaceId, t.userId), index("memberships_user").on(t.userId)],
);

/** API tokens for scripts: scoped to one workspace and one role, stored hashed (sha256). */
export const apiTokens = pgTable(
  "api_tokens",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    workspaceId: uuid("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    role: memberRole("role").notNull(),
    /** sha256 hex of the secret; the secret itself is shown once and never stored. */
    tokenHash: text("token_hash").notNull().unique(),
    /** First characters of the secret, for recognising a token in lists. */
    prefix: text("prefix").notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [
    index("api_tokens_workspace").on(t.workspaceId),
    index("api_tokens_user")
      .on(t.userId)
      .where(sql`revoked_at is null`),
  ],
);
