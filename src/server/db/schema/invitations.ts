import "../../server-only";
import { index, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { memberRole, users, workspaces } from "./accounts";

/**
 * Invitations to a workspace by e-mail (docs/accounts.md). The secret in the e-mailed link is
 * never stored, only its sha256; an invitation is used once, expires, and can be revoked.
 */
export const invitations = pgTable(
  "invitations",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    workspaceId: uuid("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    email: text("email").notNull(),
    role: memberRole("role").notNull(),
    invitedBy: uuid("invited_by")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    /** sha256 hex of the secret in the link. */
    secretHash: text("secret_hash").notNull().unique(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    acceptedAt: timestamp("accepted_at", { withTimezone: true }),
    acceptedBy: uuid("accepted_by").references(() => users.id, { onDelete: "set null" }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [index("invitations_workspace").on(t.workspaceId), index("invitations_email").on(t.email)],
);

/** Clerk webhook deliveries already applied, by svix message id: a redelivery changes nothing. */
export const clerkWebhookEvents = pgTable("clerk_webhook_events", {
  id: text("id").primaryKey(),
  type: text("type").notNull(),
  receivedAt: timestamp("received_at", { withTimezone: true }).notNull().defaultNow(),
});
