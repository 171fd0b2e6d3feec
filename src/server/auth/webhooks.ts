/**
 * Clerk webhooks: Standard Webhooks signatures (the svix scheme Clerk uses), checked here with
 * node:crypto, and the events that keep the PostgreSQL mirror current. Applying an event twice
 * changes nothing, and a redelivered message id is acknowledged without being applied again.
 */
import "@/server/server-only";
import { createHmac, timingSafeEqual } from "node:crypto";
import { eq } from "drizzle-orm";
import { getDb } from "@/server/db";
import { clerkWebhookEvents, memberships } from "@/server/db/schema";
import { ApiError } from "@/server/http/errors";
import { ensurePersonalWorkspace, nameOf, removeMembership, setMembership, upsertOrgWorkspace, upsertUser, userByClerkId, workspaceByClerkOrg } from "./sync";
import { roleFromClerk } from "./roles";

/** Signatures older or newer than this are refused (replays). */
export const WEBHOOK_TOLERANCE_S = 5 * 60;

export interface WebhookHeaders {
  id: string | null;
  timestamp: string | null;
  signature: string | null;
}

export function webhookHeaders(h: Headers): WebhookHeaders {
  return {
    id: h.get("svix-id") ?? h.get("webhook-id"),
    timestamp: h.get("svix-timestamp") ?? h.get("webhook-timestamp"),
    signature: h.get("svix-signature") ?? h.get("webhook-signature"),
  };
}

/** Throws ApiError 400 unless one `v1,<base64>` signature matches HMAC-SHA256(id.timestamp.body). */
export function verifyWebhook(secret: string, headers: WebhookHeaders, body: string, nowS = Math.floor(Date.now() / 1000)): void {
  const { id, timestamp, signature } = headers;
  if (!id || !timestamp || !signature) throw new ApiError("bad_request", "Missing webhook headers: svix-id, svix-timestamp and svix-signature are required.");
  const ts = Number(timestamp);
  if (!Number.isInteger(ts) || Math.abs(nowS - ts) > WEBHOOK_TOLERANCE_S)
    throw new ApiError("bad_request", `Webhook timestamp ${timestamp} is not within ${WEBHOOK_TOLERANCE_S} s of now; refusing a possible replay.`);
  const key = Buffer.from(secret.replace(/^whsec_/, ""), "base64");
  const expected = createHmac("sha256", key).update(`${id}.${timestamp}.${body}`).digest();
  const ok = signature.split(" ").some((part) => {
    const [version, value] = part.split(",");
    if (version !== "v1" || !value) return false;
    const given = Buffer.from(value, "base64");
    return given.length === expected.length && timingSafeEqual(given, expected);
  });
  if (!ok) throw new ApiError("bad_request", "Webhook signature does not match; check CLERK_WEBHOOK_SECRET.");
}

interface ClerkEmail {
  id: string;
  email_address: string;
}
/** The fields of the user, organization and membership events that the mirror reads. */
interface ClerkEventData {
  id?: string;
  first_name?: string | null;
  last_name?: string | null;
  email_addresses?: ClerkEmail[];
  primary_email_address_id?: string | null;
  name?: string;
  slug?: string | null;
  role?: string;
  organization?: { id?: string; name?: string; slug?: string | null };
  public_user_data?: { user_id?: string; identifier?: string; first_name?: string | null; last_name?: string | null };
}
interface ClerkEvent {
  type: string;
  data: ClerkEventData;
}

function primaryEmail(data: ClerkEventData): string | undefined {
  const emails = (data.email_addresses ?? []) as ClerkEmail[];
  return (emails.find((e) => e.id === data.primary_email_address_id) ?? emails[0])?.email_address;
}

/**
 * What applying an event did. `conflict`: the event's e-mail address belongs to another row
 * (see upsertUser); nothing was linked to that row, and the message is acknowledged (200) so
 * Clerk does not retry it.
 */
export type ClerkEventOutcome = "applied" | "ignored" | "conflict";

/** Applies one event to the mirror; unknown event types are acknowledged and ignored. */
export async function applyClerkEvent(evt: ClerkEvent): Promise<ClerkEventOutcome> {
  const d = evt.data ?? {};
  switch (evt.type) {
    case "user.created":
    case "user.updated": {
      const email = primaryEmail(d);
      if (!email || !d.id) return "ignored";
      const { user, emailTaken } = await upsertUser({ clerkUserId: d.id, email, name: nameOf(d.first_name, d.last_name) });
      if (!user) return "conflict";
      await ensurePersonalWorkspace(user);
      return emailTaken ? "conflict" : "applied";
    }
    case "user.deleted": {
      // The user's work stays with their workspaces; they only stop being a member of labs.
      const user = d.id ? await userByClerkId(d.id) : undefined;
      if (user) {
        const rows = await getDb().select().from(memberships).where(eq(memberships.userId, user.id));
        for (const m of rows) await removeMembership(m.workspaceId, user.id);
      }
      return "applied";
    }
    case "organization.created":
    case "organization.updated":
      if (!d.id) return "ignored";
      await upsertOrgWorkspace({ clerkOrgId: d.id, name: d.name ?? "", slug: d.slug ?? "" });
      return "applied";
    case "organizationMembership.created":
    case "organizationMembership.updated": {
      const org = d.organization;
      const pud = d.public_user_data ?? {};
      if (!org?.id || !pud.user_id) return "ignored";
      const ws = await upsertOrgWorkspace({ clerkOrgId: org.id, name: org.name ?? "", slug: org.slug ?? "" });
      let user = await userByClerkId(pud.user_id);
      if (!user && pud.identifier) {
        const linked = await upsertUser({ clerkUserId: pud.user_id, email: pud.identifier, name: nameOf(pud.first_name, pud.last_name) });
        // The identifier's address is another row's: that row gets no membership from this event.
        if (!linked.user) return "conflict";
        user = linked.user;
        await ensurePersonalWorkspace(user);
      }
      if (!user) return "ignored";
      await setMembership(ws.id, user.id, roleFromClerk(d.role));
      return "applied";
    }
    case "organizationMembership.deleted": {
      const ws = d.organization?.id ? await workspaceByClerkOrg(d.organization.id) : undefined;
      const user = d.public_user_data?.user_id ? await userByClerkId(d.public_user_data.user_id) : undefined;
      if (ws && user) await removeMembership(ws.id, user.id);
      return "applied";
    }
    default:
      return "ignored";
  }
}

/** Verifies, de-duplicates by message id, applies. */
export async function handleClerkWebhook(secret: string | undefined, headers: Headers, body: string) {
  if (!secret) throw new ApiError("unavailable", "Clerk webhooks are not configured: set CLERK_WEBHOOK_SECRET.");
  const h = webhookHeaders(headers);
  verifyWebhook(secret, h, body);
  let evt: ClerkEvent;
  try {
    evt = JSON.parse(body);
  } catch {
    throw new ApiError("bad_request", "Webhook body is not JSON.");
  }
  if (typeof evt?.type !== "string") throw new ApiError("bad_request", "Webhook body has no event `type`.");
  const db = getDb();
  const [seen] = await db.select().from(clerkWebhookEvents).where(eq(clerkWebhookEvents.id, h.id!));
  if (seen) return { id: h.id, type: evt.type, outcome: "duplicate" as const };
  const outcome = await applyClerkEvent(evt);
  await db.insert(clerkWebhookEvents).values({ id: h.id!, type: evt.type }).onConflictDoNothing();
  return { id: h.id, type: evt.type, outcome };
}
