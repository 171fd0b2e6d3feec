// Browser: the Group page (members, invitations, seats, API tokens) and the Billing page, walked
// by each role of the demo lab: an Owner invites, resends, revokes, changes a role and removes a
// member; a Billing admin sees seats, invoices and the portal, meets a full group, cannot save
// "abc" as the spend cap and confirms removing a cap; a Viewer reads the members and makes only
// read-only tokens. Each page gets an axe check. People this file adds leave the lab again, and
// the seats and spend cap it changes are put back.
import postgres from "postgres";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { seriousViolations } from "../support/axe";
import { fill, screenshot, url, useBrowser } from "../support/browser";
import { api, databaseUrl, ensureFreeSeats } from "../support/services";
import { createStandInUser, mailTo, sessionFetch, waitForMail } from "../support/session";

const browser = useBrowser();
const sql = postgres(databaseUrl(), { max: 1, onnotice: () => {} });
const unique = (tag: string) => `${tag}-${Date.now().toString(36)}-${Math.floor(Math.random() * 1e6)}@invitee.example`;
const tokenFrom = (text: string) => {
  const m = /accept-invitation\?token=([A-Za-z0-9_%-]+)/.exec(text);
  if (!m) throw new Error(`no invitation link in: ${text}`);
  return decodeURIComponent(m[1]);
};

type Members = { members: { userId: string; email: string; role: string }[]; invitations?: { id: string; email: string; status: string }[] };
const members = async (): Promise<Members> => (await api("/api/v1/workspace/members", { as: "owner" })).json() as Promise<Members>;

const invited: string[] = [];
let originalCap: number | null = null;

beforeAll(async () => {
  // Demo-lab invitations take seats: buy two free ones first.
  await ensureFreeSeats(2);
  const billing = (await (await api("/api/v1/billing", { as: "billingAdmin" })).json()) as { spendCapUsd: number | null };
  originalCap = billing.spendCapUsd;
});

afterAll(async () => {
  const now = await members();
  for (const i of now.invitations ?? []) if (invited.includes(i.email)) await api(`/api/v1/workspace/invitations/${i.id}`, { method: "DELETE", as: "owner" });
  for (const m of now.members) if (invited.includes(m.email)) await api(`/api/v1/workspace/members/${m.userId}`, { method: "DELETE", as: "owner" });
  await api("/api/v1/billing/spend-cap", { method: "PUT", as: "billingAdmin", json: { spendCapUsd: originalCap } });
  await sql.end();
});

async function openGroup(page: Page) {
  await page.goto(url("/workspace"));
  await page.getByRole("table", { name: "Members" }).waitFor();
  await page.getByRole("heading", { name: "API tokens" }).waitFor();
}

describe("an Owner on the Group page", () => {
  it("invites, resends and revokes an invitation, then changes the role of a new member and removes them", async () => {
    const page = await browser.signedInPage("owner");
    await openGroup(page);
    expect(await page.locator("h1").innerText()).toBe("Larkspur Devices Lab");
    // The Owner's seeded token is listed, and an Owner may give any role to a token.
    await expect.poll(() => page.getByRole("table", { name: "Your API tokens" }).innerText()).toContain("demo script token");
    expect(await page.locator("#token-role option").allInnerTexts()).toEqual(["Owner", "Billing admin", "Researcher", "Viewer (read-only)"]);
    expect(await page.locator("#invite-role option").allInnerTexts()).toEqual(["Owner", "Billing admin", "Researcher", "Viewer"]);
    expect(await page.getByTestId("seat-use").innerText()).toMatch(/\d+ of \d+ seats taken/);
    expect(await seriousViolations(page)).toEqual([]);

    // Invite, see it pending, resend (a new link replaces the old), revoke.
    const first = unique("revoked");
    invited.push(first);
    await fill(page, "invite-email", first);
    await page.locator("#invite-role").selectOption("viewer");
    await page.getByRole("button", { name: "Send invitation" }).click();
    await page.getByTestId("invite-sent").waitFor();
    const row = page.locator(`tr[data-invitation="${first}"]`);
    await row.waitFor();
    expect(await row.innerText()).toContain("Viewer");
    await waitForMail(first);
    await page.getByRole("button", { name: `Resend the invitation to ${first}` }).click();
    await page.getByTestId("invite-resent").waitFor();
    await expect.poll(async () => (await mailTo(first)).length, { timeout: 15_000 }).toBe(2);
    const open = (await members()).invitations!.filter((i) => i.email === first);
    expect(open).toHaveLength(1);
    await page.getByRole("button", { name: `Revoke the invitation to ${first}` }).click();
    await expect.poll(() => row.count()).toBe(0);
    expect((await members()).invitations!.some((i) => i.email === first)).toBe(false);

    // Invite someone who accepts; change their role; remove them after confirming.
    const email = unique("joins");
    invited.push(email);
    await fill(page, "invite-email", email);
    await page.locator("#invite-role").selectOption("viewer");
    await page.getByRole("button", { name: "Send invitation" }).click();
    await page.locator(`tr[data-invitation="${email}"]`).waitFor();
    const person = await createStandInUser({ email, name: "Pavel Ostrander" });
    const accepted = await sessionFetch(person, "/api/v1/workspace/invitations/accept", {
      method: "POST",
      json: { token: tokenFrom((await waitForMail(email)).text) },
    });
    expect(accepted.status).toBe(200);

    await openGroup(page);
    const member = page.locator(`tr[data-member="${email}"]`);
    await member.waitFor();
    await member.locator("select").selectOption("researcher");
    await member.getByRole("button", { name: "Save role" }).click();
    await member.getByText("Role changed.").waitFor();
    expect((await members()).members.find((m) => m.email === email)?.role).toBe("researcher");

    await member.getByRole("button", { name: "Remove Pavel Ostrander", exact: true }).click();
    await member.getByText("Their API tokens stop working").waitFor();
    expect(await seriousViolations(page)).toEqual([]);
    await member.getByRole("button", { name: "Yes, remove Pavel Ostrander" }).click();
    await expect.poll(() => member.count()).toBe(0);
    expect((await members()).members.some((m) => m.email === email)).toBe(false);
    await screenshot(page, "group-owner.png");
    await page.context().close();
  });
});

describe("a Billing admin", () => {
  it("sees plan, seats, invoices and the portal button of the demo lab, and sets the spend cap only with a valid amount", async () => {
    const page = await browser.signedInPage("billingAdmin");
    const caps: unknown[] = [];
    page.on("request", (r) => {
      if (r.url().includes("/api/v1/billing/spend-cap") && r.method() === "PUT") caps.push(r.postDataJSON());
    });
    await page.goto(url("/billing"));
    await page.getByTestId("billing-page").waitFor();
    expect(await page.getByTestId("plan-label").innerText()).toBe("Lab");
    expect(await page.getByTestId("plan-state").innerText()).toBe("Active");
    await expect(page.getByTestId("upgrade").count()).resolves.toBe(0);
    const seats = await (await api("/api/v1/billing/seats", { as: "billingAdmin" })).json();
    expect(Number(await page.getByTestId("seats").innerText())).toBe(seats.seats);
    expect(seats.seats).toBeGreaterThanOrEqual(seats.members);
    await page.getByTestId("open-portal").waitFor();
    await page.getByTestId("invoices").waitFor();
    await expect.poll(() => page.getByTestId("invoices").locator("tbody tr").count(), { timeout: 20_000 }).toBeGreaterThan(0);
    await page.getByTestId("usage-members").waitFor();
    expect(await page.getByTestId("usage-members").innerText()).toContain("Calculations");
    expect(await seriousViolations(page)).toEqual([]);

    // "abc" is refused in words and nothing is sent.
    await fill(page, "spend-cap", "abc");
    await page.getByTestId("spend-cap-save").click();
    expect(await page.getByTestId("spend-cap-note").innerText()).toBe(
      "Enter the monthly cap as a number of USD, such as 250, or leave the field empty for no cap.",
    );
    await fill(page, "spend-cap", "0.5");
    await page.getByTestId("spend-cap-save").click();
    expect(await page.getByTestId("spend-cap-note").innerText()).toBe("The monthly cap must be at least 1 USD, or empty for no cap.");
    expect(caps).toEqual([]);

    // A valid cap is saved; emptying the field asks first, and "Keep the cap" keeps it.
    await fill(page, "spend-cap", "250");
    await page.getByTestId("spend-cap-save").click();
    await expect.poll(() => page.getByTestId("spend-cap").innerText()).toBe("250.00 USD");
    await fill(page, "spend-cap", "");
    await page.getByTestId("spend-cap-save").click();
    await page.getByTestId("cap-remove-confirm").waitFor();
    expect(await seriousViolations(page)).toEqual([]);
    await page.getByRole("button", { name: "Keep the cap" }).click();
    expect(await page.getByTestId("spend-cap").innerText()).toBe("250.00 USD");
    await fill(page, "spend-cap", "");
    await page.getByTestId("spend-cap-save").click();
    await page.getByRole("button", { name: "Remove the cap" }).click();
    await expect.poll(() => page.getByTestId("spend-cap").innerText()).toBe("No cap");
    expect(caps).toEqual([{ spendCapUsd: 250 }, { spendCapUsd: null }]);
    const after = await (await api("/api/v1/billing", { as: "billingAdmin" })).json();
    expect(after.spendCapUsd).toBeNull();
    await screenshot(page, "billing-admin.png");
    await page.context().close();
  });

  it("invites Researchers and Viewers only, and when every seat is taken sees why and where to add one", async () => {
    const before = (await (await api("/api/v1/billing/seats", { as: "billingAdmin" })).json()) as { seats: number; minimumSeats: number };
    const page = await browser.signedInPage("billingAdmin");
    try {
      if (before.seats > before.minimumSeats) {
        const res = await api("/api/v1/billing/seats", { method: "PUT", as: "billingAdmin", json: { seats: before.minimumSeats } });
        expect(res.status).toBe(200);
      }
      await openGroup(page);
      expect(await page.locator("#invite-role option").allInnerTexts()).toEqual(["Researcher", "Viewer"]);
      // The Owner's row cannot be removed by a Billing admin, and says why.
      expect(await page.locator('tr[data-member="owner@larkspur.example"]').innerText()).toContain("Only an Owner removes Owners.");
      const email = unique("full");
      invited.push(email);
      await fill(page, "invite-email", email);
      await page.getByRole("button", { name: "Send invitation" }).click();
      const refused = page.getByTestId("invite-error");
      await refused.waitFor();
      expect(await refused.innerText()).toMatch(/Every seat is taken[\s\S]*seats of Larkspur Devices Lab are taken/);
      expect(await refused.getByRole("link", { name: "Add a seat on the Billing page" }).getAttribute("href")).toBe("/billing");
      expect(await seriousViolations(page)).toEqual([]);
    } finally {
      await page.context().close();
      if (before.seats > before.minimumSeats) await api("/api/v1/billing/seats", { method: "PUT", as: "billingAdmin", json: { seats: before.seats } });
    }
  });
});

describe("a Viewer", () => {
  it("reads the members without controls and makes only read-only tokens, seen once and copied", async () => {
    const page = await browser.signedInPage("viewer");
    await page.context().grantPermissions(["clipboard-read", "clipboard-write"], { origin: new URL(url("/")).origin });
    await openGroup(page);
    await page.getByTestId("members-read-only").waitFor();
    await expect(page.getByRole("button", { name: "Send invitation" }).count()).resolves.toBe(0);
    await expect(page.getByRole("button", { name: /^Remove/ }).count()).resolves.toBe(0);
    await expect(page.getByRole("table", { name: "Members" }).locator("select").count()).resolves.toBe(0);
    await expect(page.getByRole("table", { name: "Open invitations" }).count()).resolves.toBe(0);
    expect(await page.getByRole("table", { name: "Members" }).innerText()).toContain("Ines Okafor");
    expect(await page.locator("#token-role option").allInnerTexts()).toEqual(["Viewer (read-only)"]);
    expect(await page.getByTestId("token-roles-note").innerText()).toBe("Your role (Viewer) gives read-only tokens.");
    expect(await seriousViolations(page)).toEqual([]);

    const name = `viewer notebook ${Date.now().toString(36)}`;
    await fill(page, "token-name", name);
    await page.getByRole("button", { name: "Create token" }).click();
    const secret = await page.getByTestId("token-secret-value").inputValue();
    expect(secret).toMatch(/^trk_/);
    await page.getByRole("button", { name: "Copy", exact: true }).click();
    expect(await page.getByTestId("token-copied").innerText()).toBe("Copied to the clipboard.");
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(secret);
    const row = page.locator(`tr[data-token="${name}"]`);
    await row.waitFor();
    expect(await row.innerText()).toContain("Viewer");
    expect(await row.innerText()).toContain("Hana Brandt");
    expect(await row.innerText()).toContain(secret.slice(0, 8));
    expect(await row.innerText()).not.toContain(secret);
    // The token reads, as a viewer.
    const read = await fetch(url("/api/v1/workspace"), { headers: { authorization: `Bearer ${secret}` } });
    expect(read.status).toBe(200);
    expect((await read.json()).member.role).toBe("viewer");

    await row.getByRole("button", { name: `Revoke ${name}` }).click();
    await row.getByRole("button", { name: "Yes, revoke" }).click();
    await expect.poll(() => row.count()).toBe(0);
    expect((await fetch(url("/api/v1/workspace"), { headers: { authorization: `Bearer ${secret}` } })).status).toBe(401);
    await page.getByRole("button", { name: "Done" }).click();
    await expect(page.getByTestId("token-secret").count()).resolves.toBe(0);
    await page.context().close();
  });
});

describe("the Billing page in every plan state", () => {
  it("reads right on Free, and on Lab in grace and suspended", async () => {
    // Free: the student's personal group.
    const student = await browser.signedInPage("student");
    await student.goto(url("/billing"));
    await student.getByTestId("billing-page").waitFor();
    expect(await student.getByTestId("plan-label").innerText()).toBe("Free");
    await expect(student.getByTestId("plan-state").count()).resolves.toBe(0);
    expect(await student.getByTestId("upgrade").innerText()).toBe("Upgrade to Lab (1 × 24 USD / month)");
    expect(await student.getByTestId("seats").innerText()).toBe("–");
    await expect(student.getByTestId("invoices").count()).resolves.toBe(0);
    await expect(student.getByTestId("open-portal").count()).resolves.toBe(0);
    expect(await seriousViolations(student)).toEqual([]);
    await student.context().close();

    // Lab in grace, then suspended (set in the database as the payment webhooks would), then active again.
    const [lab] = await sql<{ id: string }[]>`select id from workspaces where clerk_org_id = 'org_demo_larkspur'`;
    const graceEnds = new Date(Date.now() + 5 * 86400_000);
    const page = await browser.signedInPage("billingAdmin");
    try {
      await sql`insert into workspace_billing (workspace_id, grace_ends_at) values (${lab.id}, ${graceEnds}) on conflict (workspace_id) do update set grace_ends_at = ${graceEnds}`;
      await sql`update workspaces set plan_state = 'grace' where id = ${lab.id}`;
      await page.goto(url("/billing"));
      await page.getByTestId("grace-banner").waitFor();
      expect(await page.getByTestId("plan-state").innerText()).toBe(`Payment failed: Lab limits stay until ${graceEnds.toISOString().slice(0, 10)}`);
      expect(await page.getByTestId("open-portal").innerText()).toBe("Update payment details");
      await expect(page.getByTestId("upgrade").count()).resolves.toBe(0);
      expect(await seriousViolations(page)).toEqual([]);

      await sql`update workspaces set plan_state = 'suspended' where id = ${lab.id}`;
      await page.reload();
      await page.getByTestId("suspended-banner").waitFor();
      expect(await page.getByTestId("plan-label").innerText()).toBe("Lab");
      expect(await page.getByTestId("plan-state").innerText()).toBe("Suspended: Free limits apply until the open invoice is paid");
      expect(await page.getByTestId("open-portal").innerText()).toBe("Update payment details");
      await page.getByTestId("invoices").waitFor();
      expect(await seriousViolations(page)).toEqual([]);
    } finally {
      await sql`update workspaces set plan_state = 'active' where id = ${lab.id}`;
      await sql`update workspace_billing set grace_ends_at = null where workspace_id = ${lab.id}`;
      await page.context().close();
    }
  });
});
