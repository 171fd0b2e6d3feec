// Accounts in the browser (Debian Chromium): sign-up with a personal Free workspace, sign-out and
// sign-in through our own pages on the real Clerk SDK and the stand-in; an invitation by e-mail
// accepted by a new person who then sees the lab's networks; a Viewer cannot start a run.
import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { screenshot, url, useBrowser } from "../support/browser";
import type { Json } from "../support/json";
import { api, ensureFreeSeats } from "../support/services";
import { signInThroughForm, waitForMail } from "../support/session";

const browser = useBrowser();

const unique = (tag: string) => `${tag}-${Date.now()}-${Math.floor(Math.random() * 1e6)}@e2e.example`;

/** GET /api/v1/workspace from inside the page (its cookies, its session). */
async function whoAmI(page: Page): Promise<{ status: number; body: Json }> {
  return page.evaluate(async () => {
    const res = await fetch("/api/v1/workspace");
    return { status: res.status, body: await res.json() };
  });
}

async function signUp(page: Page, name: string, email: string, password: string) {
  await page.locator('[data-testid="sign-up-form"][data-ready="yes"]').waitFor({ timeout: 60_000 });
  await page.fill("#name", name);
  await page.fill("#email", email);
  await page.fill("#password", password);
  await page.click('button[type="submit"]');
}

describe("sign-up, sign-out, sign-in", () => {
  it("a new person signs up, gets a personal Free group, signs out and signs in again", async () => {
    const page = await browser.newPage();
    const email = unique("signup");
    const password = "correct-horse-2026";
    await page.goto(url("/sign-up"));
    await expect(page.locator("h1").innerText()).resolves.toBe("Create your account");
    // Our own form tells what is wrong before anything is sent.
    await page.locator('[data-testid="sign-up-form"][data-ready="yes"]').waitFor({ timeout: 60_000 });
    await page.fill("#email", "not-an-address");
    await page.click('button[type="submit"]');
    await expect(page.locator("#email-error").innerText()).resolves.toMatch(/valid e-mail/);
    await screenshot(page, "auth-sign-up.png");

    await signUp(page, "Ada Quill", email, password);
    await page.waitForURL((u) => u.pathname === "/networks", { timeout: 60_000 });
    const first = await whoAmI(page);
    expect(first.status).toBe(200);
    expect(first.body.workspace).toMatchObject({ kind: "personal", plan: "free" });
    expect(first.body.member).toMatchObject({ email, name: "Ada Quill", role: "owner" });

    // Signed in, the sign-in page offers the way in instead of a form.
    await page.goto(url("/sign-in"));
    await page.locator('[data-testid="already-signed-in"]').waitFor();
    await expect(page.locator('[data-testid="sign-in-form"]').count()).resolves.toBe(0);

    await page.goto(url("/sign-out"));
    await page.waitForURL((u) => u.pathname === "/sign-in", { timeout: 60_000 });
    await page.locator('[data-testid="sign-in-form"][data-ready="yes"]').waitFor({ timeout: 60_000 });
    expect((await whoAmI(page)).status).toBe(401);
    await page.goto(url("/networks"));
    await page.waitForURL((u) => u.pathname === "/sign-in");

    // A wrong password is refused on the field; the right one signs in to the same workspace.
    await page.locator('[data-testid="sign-in-form"][data-ready="yes"]').waitFor({ timeout: 60_000 });
    await page.fill("#email", email);
    await page.fill("#password", "wrong-password");
    await page.click('button[type="submit"]');
    await expect(page.locator("#password-error").innerText()).resolves.toMatch(/incorrect/i);
    await screenshot(page, "auth-sign-in-error.png");
    await signInThroughForm(page, { email, password });
    const again = await whoAmI(page);
    expect(again.status).toBe(200);
    expect(again.body.workspace.id).toBe(first.body.workspace.id);
    await page.context().close();
  });
});

describe("invitations", () => {
  it("an Owner invites a Researcher; the e-mail arrives; the invitee signs up, accepts and sees the lab's networks", async () => {
    await ensureFreeSeats(1);
    // The Owner, signed in with the lab active, invites from the browser session.
    const owner = await browser.signedInPage("owner");
    await owner.goto(url("/networks"));
    const email = unique("invitee");
    const invited = await owner.evaluate(async (address) => {
      const res = await fetch("/api/v1/workspace/members", {
        method: "POST",
        headers: { "content-type": "application/json" },
        body: JSON.stringify({ email: address, role: "researcher" }),
      });
      return { status: res.status, body: await res.json() };
    }, email);
    expect(invited.status).toBe(201);
    await owner.context().close();

    const mail = await waitForMail(email);
    expect(mail.subject).toContain("Larkspur Devices Lab");
    const link = /https?:\/\/\S+\/accept-invitation\?token=[A-Za-z0-9_%-]+/.exec(mail.text)?.[0];
    expect(link).toBeTruthy();

    const invitee = await browser.newPage();
    await invitee.goto(link!);
    await expect(invitee.getByText("Larkspur Devices Lab").first().isVisible()).resolves.toBe(true);
    await expect(invitee.getByText("Researcher").first().isVisible()).resolves.toBe(true);
    await screenshot(invitee, "auth-accept-invitation.png");
    await invitee.click("text=Create an account to join");
    await invitee.waitForURL((u) => u.pathname === "/sign-up");
    await expect(invitee.inputValue("#email")).resolves.toBe(email);
    await signUp(invitee, "Noor Haddad", email, "invited-2026-pass");
    await invitee.waitForURL((u) => u.pathname === "/accept-invitation", { timeout: 60_000 });
    await invitee.locator('[data-testid="accept-invitation"][data-ready="yes"]').waitFor({ timeout: 60_000 });
    await invitee.click("text=Join Larkspur Devices Lab");
    await invitee.waitForURL((u) => u.pathname === "/networks", { timeout: 60_000 });

    const me = await whoAmI(invitee);
    expect(me.body.workspace.clerkOrgId).toBe("org_demo_larkspur");
    expect(me.body.member).toMatchObject({ email, role: "researcher" });
    await invitee.getByText("Clean 0.11° triangular network").first().waitFor({ timeout: 30_000 });
    await screenshot(invitee, "auth-invitee-networks.png");
    await invitee.context().close();
    // Leave the demo lab as seeded for other test files.
    expect((await api(`/api/v1/workspace/members/${me.body.member.id}`, { method: "DELETE", as: "owner" })).status).toBe(204);
  });
});

describe("roles in the browser", () => {
  it("a Viewer sees a network with the start button disabled and the API's reason, and the API refuses the calculation (403); a Researcher may start it", async () => {
    const nets = await (await api("/api/v1/networks", { as: "viewer" })).json();
    const list = (nets.networks ?? nets.items ?? nets.data ?? nets) as { id: string; name: string }[];
    const net = list.find((n) => n.name === "Clean 0.11° triangular network")!;
    expect(net).toBeTruthy();

    const viewer = await browser.signedInPage("viewer");
    await viewer.goto(url(`/networks/${net.id}`));
    await viewer.locator("#run-refusal").waitFor({ timeout: 30_000 });
    await expect(viewer.locator('#run button[type="submit"]').isDisabled()).resolves.toBe(true);
    const refused = await viewer.evaluate(async (networkId) => {
      const res = await fetch("/api/v1/runs", {
        method: "POST",
        headers: { "content-type": "application/json" },
        body: JSON.stringify({ networkId, computation: "conductance", parameters: { energyMeV: 0 } }),
      });
      return { status: res.status, body: await res.json() };
    }, net.id);
    expect(refused.status).toBe(403);
    expect(refused.body.error.code).toBe("forbidden");
    // The reason shown before the click is the API's own sentence.
    await expect(viewer.locator("#run-refusal").innerText()).resolves.toBe(refused.body.error.message);
    await screenshot(viewer, "auth-viewer-network.png");
    await viewer.context().close();

    const researcher = await browser.signedInPage("researcher");
    await researcher.goto(url(`/networks/${net.id}`));
    await researcher.locator('#run button[type="submit"]:not([disabled])').waitFor({ timeout: 30_000 });
    await expect(researcher.locator("#run-refusal").count()).resolves.toBe(0);
    await researcher.context().close();
  });
});
