// Clerk webhooks (/api/webhooks/clerk): Standard Webhooks signature checked, events applied to
// the PostgreSQL mirror, a redelivered message applied once.
import { createHmac, randomUUID } from "node:crypto";
import postgres from "postgres";
import { afterAll, describe, expect, it } from "vitest";
import { appUrl, databaseUrl } from "../support/services";
import { createStandInUser, sessionFetch } from "../support/session";

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

describe("accounts are linked by Clerk user id, never by e-mail alone", () => {
  const stamp = () => `${Date.now()}-${Math.random().toString(36).slice(2, 7)}`;
  async function mirrored(clerkId: string, email: string) {
    const body = userCreated(clerkId, email);
    const res = await post(body, signed(body).headers);
    expect(res.status).toBe(200);
    expect((await res.json()).outcome).toBe("applied");
    const [row] = await sql`select id, clerk_user_id, email from users where clerk_user_id = ${clerkId}`;
    return row;
  }
  const membershipsOf = (userId: string) =>
    sql`select workspace_id, role from memberships where user_id = ${userId} order by workspace_id`.then((rows) => rows.map((r) => ({ ...r })));

  it("user.created with another Clerk id and an existing e-mail takes nothing over (200, outcome conflict)", async () => {
    const s = stamp();
    const email = `holder-${s}@webhook.example`;
    const holder = await mirrored(`user_wh_holder_${s}`, email);
    const before = await membershipsOf(holder.id);
    expect(before).toHaveLength(1);
    const intruder = `user_wh_intruder_${s}`;
    const body = userCreated(intruder, email.toUpperCase());
    const res = await post(body, signed(body).headers);
    expect(res.status).toBe(200);
    expect((await res.json()).outcome).toBe("conflict");
    const [row] = await sql`select clerk_user_id, email from users where id = ${holder.id}`;
    expect(row).toEqual({ clerk_user_id: `user_wh_holder_${s}`, email });
    expect(await sql`select id from users where clerk_user_id = ${intruder}`).toHaveLength(0);
    expect(await sql`select id from workspaces where slug = ${`personal-${intruder}`}`).toHaveLength(0);
    expect(await membershipsOf(holder.id)).toEqual(before);
  });

  it("a membership event for an unknown Clerk id whose address is taken gives the holder no membership", async () => {
    const s = stamp();
    const email = `member-holder-${s}@webhook.example`;
    const holder = await mirrored(`user_wh_mholder_${s}`, email);
    const before = await membershipsOf(holder.id);
    const intruder = `user_wh_mintruder_${s}`;
    const body = JSON.stringify({
      type: "organizationMembership.created",
      object: "event",
      data: {
        id: `orgmem_wh_${s}`,
        role: "org:owner",
        organization: { id: "org_demo_larkspur", name: "Larkspur Devices Lab", slug: "larkspur-devices-lab" },
        public_user_data: { user_id: intruder, identifier: email, first_name: "Not", last_name: "Them" },
      },
    });
    const res = await post(body, signed(body).headers);
    expect(res.status).toBe(200);
    expect((await res.json()).outcome).toBe("conflict");
    expect(await membershipsOf(holder.id)).toEqual(before);
    const [row] = await sql`select clerk_user_id from users where id = ${holder.id}`;
    expect(row.clerk_user_id).toBe(`user_wh_mholder_${s}`);
    expect(await sql`select id from users where clerk_user_id = ${intruder}`).toHaveLength(0);
  });

  it("user.updated to an address another row holds keeps the user's own address and the other row untouched", async () => {
    const s = stamp();
    const a = await mirrored(`user_wh_a_${s}`, `a-${s}@webhook.example`);
    const b = await mirrored(`user_wh_b_${s}`, `b-${s}@webhook.example`);
    const body = JSON.stringify({ ...JSON.parse(userCreated(`user_wh_a_${s}`, `b-${s}@webhook.example`)), type: "user.updated" });
    const res = await post(body, signed(body).headers);
    expect(res.status).toBe(200);
    expect((await res.json()).outcome).toBe("conflict");
    expect((await sql`select email from users where id = ${a.id}`)[0].email).toBe(`a-${s}@webhook.example`);
    expect((await sql`select clerk_user_id, email from users where id = ${b.id}`)[0]).toEqual({
      clerk_user_id: `user_wh_b_${s}`,
      email: `b-${s}@webhook.example`,
    });
  });

  it("a stand-in sign-up with an address already on another row: its webhook and its session both leave that row alone (409)", async () => {
    const s = stamp();
    const email = `taken-${s}@webhook.example`;
    const [row] = await sql`insert into users (email, name, clerk_user_id) values (${email}, 'Earlier Person', ${`user_elsewhere_${s}`}) returning id`;
    const [{ t0 }] = await sql`select now() as t0`;
    const person = await createStandInUser({ email, name: "Later Person" });
    const res = await sessionFetch(person, "/api/v1/workspace");
    expect(res.status).toBe(409);
    expect((await res.json()).error.message).toContain("already belongs to another Triskel account");
    // The stand-in's own user.created delivery for the new person has been handled by now too.
    for (let i = 0; i < 60; i++) {
      if ((await sql`select 1 from clerk_webhook_events where type = 'user.created' and received_at >= ${t0}`).length) break;
      await new Promise((r) => setTimeout(r, 250));
    }
    expect((await sql`select clerk_user_id, name from users where id = ${row.id}`)[0]).toEqual({
      clerk_user_id: `user_elsewhere_${s}`,
      name: "Earlier Person",
    });
    expect(await sql`select id from users where clerk_user_id = ${person.clerkUserId}`).toHaveLength(0);
  });
});
