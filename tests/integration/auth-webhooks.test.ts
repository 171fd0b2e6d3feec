// Clerk webhooks (/api/webhooks/clerk): Standard Webhooks signature checked, events applied to
// the PostgreSQL mirror, a redelivered message applied once.
import { createHmac, randomUUID } from "node:crypto";
import postgres from "postgres";
import { afterAll, describe, expect, it } from "vitest";
import { appUrl, databaseUrl } from "../support/services";

const sql = postgres(databaseUrl(), { max: 2, onnotice: () => {} });
afterAll(async () => {
  await sql.end();
});

function secret(): string {
  const s = process.env.CLERK_WEBHOOK_SECRET;
  if (!s) throw new Error("CLERK_WEBHOOK_SECRET is not set: run through `npm test`");
  return s;
}

function signed(body: string, opts: { id?: string; ts?: number; key?: string } = {}) {
  const id = opts.id ?? `msg_${randomUUID()}`;
  const ts = String(opts.ts ?? Math.floor(Date.now() / 1000));
  const key = Buffer.from((opts.key ?? secret()).replace(/^whsec_/, ""), "base64");
  const sig = createHmac("sha256", key).update(`${id}.${ts}.${body}`).digest("base64");
  return { id, headers: { "content-type": "application/json", "svix-id": id, "svix-timestamp": ts, "svix-signature": `v1,${sig}` } };
}

const post = (body: string, headers: Record<string, string>) => fetch(new URL("/api/webhooks/clerk", appUrl()), { method: "POST", headers, body });

function userCreated(clerkId: string, email: string) {
  return JSON.stringify({
    type: "user.created",
    object: "event",
    data: {
      id: clerkId,
      first_name: "Webhook",
      last_name: "Person",
      primary_email_address_id: "idn_1",
      email_addresses: [{ id: "idn_1", email_address: email }],
    },
  });
}

describe("Clerk webhooks", () => {
  it("refuses a bad signature, a signature from another secret, a stale timestamp and missing headers", async () => {
    const body = userCreated(`user_wh_${Date.now()}`, `refused-${Date.now()}@webhook.example`);
    const good = signed(body);
    const tampered = await post(body.replace("Webhook", "Tampered"), good.headers);
    expect(tampered.status).toBe(400);
    expect((await tampered.json()).error.message).toMatch(/signature/);
    const otherKey = await post(body, signed(body, { key: "whsec_" + Buffer.from("another secret").toString("base64") }).headers);
    expect(otherKey.status).toBe(400);
    const stale = await post(body, signed(body, { ts: Math.floor(Date.now() / 1000) - 3600 }).headers);
    expect(stale.status).toBe(400);
    expect((await stale.json()).error.message).toMatch(/timestamp/);
    const bare = await post(body, { "content-type": "application/json" });
    expect(bare.status).toBe(400);
    const [row] = await sql`select count(*)::int as n from users where email like 'refused-%@webhook.example'`;
    expect(row.n).toBe(0);
  });

  it("user.created mirrors the user with a personal Free workspace; a redelivery is applied once", async () => {
    const clerkId = `user_wh_${Date.now()}`;
    const email = `new-${Date.now()}@webhook.example`;
    const body = userCreated(clerkId, email);
    const delivery = signed(body);
    const first = await post(body, delivery.headers);
    expect(first.status).toBe(200);
    expect((await first.json()).outcome).toBe("applied");
    const again = await post(body, signed(body, { id: delivery.id }).headers);
    expect(again.status).toBe(200);
    expect((await again.json()).outcome).toBe("duplicate");
    const users = await sql`select id, name from users where clerk_user_id = ${clerkId}`;
    expect(users).toHaveLength(1);
    expect(users[0].name).toBe("Webhook Person");
    const ws = await sql`select w.kind, w.plan, m.role from workspaces w join memberships m on m.workspace_id = w.id where m.user_id = ${users[0].id}`;
    expect(ws).toEqual([{ kind: "personal", plan: "free", role: "owner" }]);
  });

  it("organization membership events add, change and remove a member in the mirror", async () => {
    const clerkId = `user_wh_m_${Date.now()}`;
    const email = `member-${Date.now()}@webhook.example`;
    const org = { id: "org_demo_larkspur", name: "Larkspur Devices Lab", slug: "larkspur-devices-lab" };
    const membership = (type: string, role: string) =>
      JSON.stringify({
        type,
        object: "event",
        data: { id: "orgmem_wh", role, organization: org, public_user_data: { user_id: clerkId, identifier: email, first_name: "Mem", last_name: "Ber" } },
      });
    const roleNow = async () =>
      (
        await sql`select m.role from memberships m join users u on u.id = m.user_id join workspaces w on w.id = m.workspace_id
          where u.clerk_user_id = ${clerkId} and w.clerk_org_id = ${org.id}`
      )[0]?.role ?? null;

    let body = membership("organizationMembership.created", "org:researcher");
    expect((await post(body, signed(body).headers)).status).toBe(200);
    expect(await roleNow()).toBe("researcher");
    body = membership("organizationMembership.updated", "org:billing_admin");
    expect((await post(body, signed(body).headers)).status).toBe(200);
    expect(await roleNow()).toBe("billing_admin");
    body = membership("organizationMembership.deleted", "org:billing_admin");
    expect((await post(body, signed(body).headers)).status).toBe(200);
    expect(await roleNow()).toBeNull();
  });

  it("the sign-in stand-in's own deliveries arrive: a sign-up there shows up in the mirror", async () => {
    const email = `standin-${Date.now()}@webhook.example`;
    const res = await fetch(`${process.env.CLERK_FAKE_URL}/v1/users`, {
      method: "POST",
      headers: { "content-type": "application/json", authorization: `Bearer ${process.env.CLERK_SECRET_KEY}` },
      body: JSON.stringify({ email_address: [email], password: "stand-in-pass-2026", first_name: "Stand", last_name: "In" }),
    });
    expect(res.status).toBe(200);
    const { id } = await res.json();
    let found: string | undefined;
    for (let i = 0; i < 60 && !found; i++) {
      const rows = await sql<{ email: string }[]>`select email from users where clerk_user_id = ${id}`;
      found = rows[0]?.email;
      if (!found) await new Promise((r) => setTimeout(r, 250));
    }
    expect(found).toBe(email);
  });
});
