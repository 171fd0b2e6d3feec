// Members of a workspace (/api/v1/workspace/members) and invitations by e-mail, per the Roles
// table of product.md: Owners manage members; Billing admins fill and free Researcher and Viewer
// seats; others only read. Changes reach Clerk (the stand-in) and the PostgreSQL mirror.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { api, appUrl, ensureFreeSeats } from "../support/services";
import { createStandInUser, sessionCookies, sessionFetch, waitForMail } from "../support/session";

const LAB_ORG = "org_demo_larkspur";
const unique = (tag: string) => `${tag}-${Date.now()}-${Math.floor(Math.random() * 1e6)}@invitee.example`;
const tokenFrom = (text: string) => {
  const m = /accept-invitation\?token=([A-Za-z0-9_%-]+)/.exec(text);
  if (!m) throw new Error(`no invitation link in: ${text}`);
  return decodeURIComponent(m[1]);
};

async function clerkMembers(orgId: string): Promise<{ role: string; public_user_data: { identifier: string } }[]> {
  const res = await fetch(`${process.env.CLERK_FAKE_URL}/v1/organizations/${orgId}/memberships?limit=100`, {
    headers: { authorization: `Bearer ${process.env.CLERK_SECRET_KEY}` },
  });
  return (await res.json()).data;
}

// People these tests add to the demo lab leave it again, so the demo data stays as seeded.
const joined: string[] = [];
// Every invitation takes a seat of the demo lab: its Billing admin buys enough first.
beforeAll(async () => {
  await ensureFreeSeats(12);
});

afterAll(async () => {
  for (const userId of joined) await api(`/api/v1/workspace/members/${userId}`, { method: "DELETE", as: "owner" });
  const open = (await (await api("/api/v1/workspace/invitations", { as: "owner" })).json()).invitations as { id: string; email: string; status: string }[];
  for (const i of open.filter((x) => x.status === "pending" && x.email.endsWith("@invitee.example")))
    await api(`/api/v1/workspace/invitations/${i.id}`, { method: "DELETE", as: "owner" });
});

/** An Owner invites; the invitee (a new person) accepts; returns their credentials and user id. */
async function inviteAndAccept(role: "researcher" | "viewer") {
  const email = unique(role);
  const invited = await api("/api/v1/workspace/members", { method: "POST", as: "owner", json: { email, role } });
  expect(invited.status).toBe(201);
  const mail = await waitForMail(email);
  const person = await createStandInUser({ email, name: "Invited Person" });
  const accepted = await sessionFetch(person, "/api/v1/workspace/invitations/accept", { method: "POST", json: { token: tokenFrom(mail.text) } });
  expect(accepted.status).toBe(200);
  const me = await (await sessionFetch(person, "/api/v1/workspace", { organizationId: LAB_ORG })).json();
  joined.push(me.member.id);
  return { person, email, userId: me.member.id as string, me };
}

describe("listing members", () => {
  it("every member of the lab sees the members and roles; only managers see invitations and seats", async () => {
    const res = await api("/api/v1/workspace/members", { as: "viewer" });
    expect(res.status).toBe(200);
    const body = await res.json();
    const roles = Object.fromEntries(body.members.map((m: { email: string; role: string }) => [m.email, m.role]));
    expect(roles).toMatchObject({
      "owner@larkspur.example": "owner",
      "billing@larkspur.example": "billing_admin",
      "researcher@larkspur.example": "researcher",
      "viewer@larkspur.example": "viewer",
    });
    expect(body.invitations).toBeUndefined();
    const asOwner = await (await api("/api/v1/workspace/members", { as: "owner" })).json();
    expect(Array.isArray(asOwner.invitations)).toBe(true);
    // Lab: the member limit is the seats bought, and every member and open invitation holds one.
    expect(asOwner.seats.plan).toBe("lab");
    expect(asOwner.seats.limit).toBe(asOwner.seats.seats);
    expect(asOwner.seats.members).toBe(asOwner.members.length);
    expect(asOwner.seats.seats).toBeGreaterThanOrEqual(asOwner.seats.members + asOwner.seats.pending);
  });

  it("a member of another workspace sees only their own workspace, never the lab's members", async () => {
    const body = await (await api("/api/v1/workspace/members", { as: "student" })).json();
    expect(body.members.map((m: { email: string }) => m.email)).toEqual(["student@fernhill.example"]);
  });
});

describe("invitations", () => {
  it("an Owner invites by e-mail; the message arrives at the mail stand-in with a one-time link", async () => {
    const email = unique("mail");
    const res = await api("/api/v1/workspace/members", { method: "POST", as: "owner", json: { email, role: "researcher" } });
    expect(res.status).toBe(201);
    const { invitation } = await res.json();
    expect(invitation).toMatchObject({ email, role: "researcher", status: "pending" });
    expect(JSON.stringify(invitation)).not.toMatch(/inv_/);
    const mail = await waitForMail(email);
    expect(mail.subject).toContain("Larkspur Devices Lab");
    expect(mail.text).toContain("Researcher");
    expect(tokenFrom(mail.text)).toMatch(/^inv_/);
    const list = await (await api("/api/v1/workspace/members", { as: "owner" })).json();
    expect(list.invitations.map((i: { email: string }) => i.email)).toContain(email);
  });

  it("the invitee signs up, accepts, and is a member with the role given, at Clerk and in our mirror", async () => {
    const { email, me } = await inviteAndAccept("researcher");
    expect(me.workspace.clerkOrgId).toBe(LAB_ORG);
    expect(me.member).toMatchObject({ email, role: "researcher" });
    const atClerk = (await clerkMembers(LAB_ORG)).find((m) => m.public_user_data.identifier === email);
    expect(atClerk?.role).toBe("org:researcher");
    const list = await (await api("/api/v1/workspace/members", { as: "viewer" })).json();
    expect(list.members.find((m: { email: string }) => m.email === email)?.role).toBe("researcher");
  });

  it("a link works once, only for the address invited, and not after revocation", async () => {
    const email = unique("once");
    const { invitation } = await (await api("/api/v1/workspace/members", { method: "POST", as: "owner", json: { email, role: "viewer" } })).json();
    const token = tokenFrom((await waitForMail(email)).text);
    const wrongPerson = await sessionFetch("student", "/api/v1/workspace/invitations/accept", { method: "POST", json: { token } });
    expect(wrongPerson.status).toBe(403);
    expect((await wrongPerson.json()).error.message).toContain(email);

    const revoked = await api(`/api/v1/workspace/invitations/${invitation.id}`, { method: "DELETE", as: "owner" });
    expect(revoked.status).toBe(200);
    expect((await revoked.json()).invitation.status).toBe("revoked");
    const person = await createStandInUser({ email });
    const late = await sessionFetch(person, "/api/v1/workspace/invitations/accept", { method: "POST", json: { token } });
    expect(late.status).toBe(409);
    const bogus = await sessionFetch(person, "/api/v1/workspace/invitations/accept", { method: "POST", json: { token: "inv_not-a-real-one" } });
    expect(bogus.status).toBe(404);
  });

  it("who may invite: Owner anyone; Billing admin Researchers and Viewers; others no one", async () => {
    const billingViewer = await api("/api/v1/workspace/members", { method: "POST", as: "billingAdmin", json: { email: unique("seat"), role: "viewer" } });
    expect(billingViewer.status).toBe(201);
    const billingOwner = await api("/api/v1/workspace/members", { method: "POST", as: "billingAdmin", json: { email: unique("seat"), role: "owner" } });
    expect(billingOwner.status).toBe(403);
    expect((await billingOwner.json()).error.message).toMatch(/Researchers and Viewers only/);
    for (const who of ["researcher", "viewer"] as const) {
      const res = await api("/api/v1/workspace/members", { method: "POST", as: who, json: { email: unique("no"), role: "viewer" } });
      expect(`${who} ${res.status}`).toBe(`${who} 403`);
    }
    const personal = await api("/api/v1/workspace/members", { method: "POST", as: "student", json: { email: unique("solo"), role: "viewer" } });
    expect(personal.status).toBe(409);
    const already = await api("/api/v1/workspace/members", { method: "POST", as: "owner", json: { email: "viewer@larkspur.example", role: "viewer" } });
    expect(already.status).toBe(409);
  });

  it("names the field and the allowed values for bad input", async () => {
    const email = await api("/api/v1/workspace/members", { method: "POST", as: "owner", json: { email: "not-an-address", role: "viewer" } });
    expect(email.status).toBe(422);
    expect((await email.json()).error.message).toMatch(/^email: must be an e-mail address/);
    const role = await api("/api/v1/workspace/members", { method: "POST", as: "owner", json: { email: unique("r"), role: "member" } });
    expect(role.status).toBe(422);
    expect((await role.json()).error.message).toMatch(/^role: must be one of owner, billing_admin, researcher, viewer/);
  });
});

describe("changing roles and removing members", () => {
  it("an Owner changes a role (at Clerk too); nobody else may", async () => {
    const { userId, email, person } = await inviteAndAccept("researcher");
    for (const who of ["billingAdmin", "researcher", "viewer"] as const) {
      const res = await api(`/api/v1/workspace/members/${userId}`, { method: "PATCH", as: who, json: { role: "viewer" } });
      expect(`${who} ${res.status}`).toBe(`${who} 403`);
    }
    const res = await api(`/api/v1/workspace/members/${userId}`, { method: "PATCH", as: "owner", json: { role: "viewer" } });
    expect(res.status).toBe(200);
    expect((await res.json()).member.role).toBe("viewer");
    expect((await clerkMembers(LAB_ORG)).find((m) => m.public_user_data.identifier === email)?.role).toBe("org:viewer");
    const me = await (await sessionFetch(person, "/api/v1/workspace", { organizationId: LAB_ORG })).json();
    expect(me.member.role).toBe("viewer");
  });

  it("the only Owner cannot be demoted or removed", async () => {
    const members = (await (await api("/api/v1/workspace/members", { as: "owner" })).json()).members;
    const owner = members.find((m: { email: string }) => m.email === "owner@larkspur.example");
    const demote = await api(`/api/v1/workspace/members/${owner.userId}`, { method: "PATCH", as: "owner", json: { role: "researcher" } });
    expect(demote.status).toBe(409);
    const remove = await api(`/api/v1/workspace/members/${owner.userId}`, { method: "DELETE", as: "owner" });
    expect(remove.status).toBe(409);
  });

  it("a Billing admin frees a Viewer's seat; the removed member's session no longer reaches the lab", async () => {
    const { userId, email, person } = await inviteAndAccept("viewer");
    // A session token issued while still a member (it names the lab as active organization).
    const stale = await sessionCookies(person, { organizationId: LAB_ORG });
    const byResearcher = await api(`/api/v1/workspace/members/${userId}`, { method: "DELETE", as: "researcher" });
    expect(byResearcher.status).toBe(403);
    const res = await api(`/api/v1/workspace/members/${userId}`, { method: "DELETE", as: "billingAdmin" });
    expect(res.status).toBe(204);
    expect((await clerkMembers(LAB_ORG)).some((m) => m.public_user_data.identifier === email)).toBe(false);
    const list = await (await api("/api/v1/workspace/members", { as: "owner" })).json();
    expect(list.members.some((m: { email: string }) => m.email === email)).toBe(false);
    const staleRes = await fetch(new URL("/api/v1/workspace", appUrl()), {
      headers: {
        cookie: Object.entries(stale.cookies)
          .map(([k, v]) => `${k}=${v}`)
          .join("; "),
      },
    });
    expect(staleRes.status).toBe(403);
    const after = await sessionFetch(person, "/api/v1/workspace", { workspace: "personal" });
    expect((await after.json()).workspace.kind).toBe("personal");
  });

  it("members of another workspace get 404 for the lab's members, and nothing changes", async () => {
    const members = (await (await api("/api/v1/workspace/members", { as: "owner" })).json()).members;
    const viewer = members.find((m: { email: string }) => m.email === "viewer@larkspur.example");
    const patch = await api(`/api/v1/workspace/members/${viewer.userId}`, { method: "PATCH", as: "student", json: { role: "owner" } });
    expect(patch.status).toBe(404);
    const del = await api(`/api/v1/workspace/members/${viewer.userId}`, { method: "DELETE", as: "student" });
    expect(del.status).toBe(404);
    const again = (await (await api("/api/v1/workspace/members", { as: "owner" })).json()).members;
    expect(again.find((m: { email: string }) => m.email === "viewer@larkspur.example").role).toBe("viewer");
  });
});
