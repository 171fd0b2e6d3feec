// Browser: one journey per kind of person, each page with an axe check.
//   Owner: one logo on the sign-in page, the landing page and the app; the sidebar stays at the
//     top of a long page; groups listed by full name; the last-used group comes back after
//     signing out and in again (a lab member starts in the lab); the sign-out control.
//   Viewer: create, save, calculate, scan, upload and fit controls disabled, each with the reason
//     the API answers a 403 with; /billing shows no one's usage, and the API refuses it too.
//   Student on Free: an over-size network cannot be saved and an over-size scan cannot be
//     started, each with the limit in words and an upgrade link; nothing says "charged".
//   Newcomer: a new account's group has an example network and a first-steps card that leads to a
//     first calculation; empty lists show no paging; the status page in words; pricing with
//     navigation and a sign-up button.
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { seriousViolations } from "../support/axe";
import { fill, screenshot, url, useBrowser } from "../support/browser";
import { api } from "../support/services";
import { createStandInUser, signInThroughForm } from "../support/session";
import { SMALL_RUN } from "../integration/authz-table";

const browser = useBrowser();
const LAB = "Larkspur Devices Lab";

async function labNetworkId(): Promise<string> {
  const list = (await (await api("/api/v1/networks?limit=50", { as: "viewer" })).json()) as { networks: { id: string; name: string }[] };
  return list.networks.find((n) => n.name === "Clean 0.11° triangular network")!.id;
}

/** The drawing of the logo's mark on this page (the one Logo component draws it everywhere, at the page's size). */
const logoMark = (page: Page) =>
  page
    .getByTestId("logo")
    .first()
    .locator("svg")
    .evaluate((svg) => `${svg.getAttribute("viewBox")} ${svg.innerHTML}`);

async function activeGroup(page: Page): Promise<string> {
  const groups = page.getByTestId("group-selector");
  await groups.waitFor();
  return groups.locator('button[aria-pressed="true"]').innerText();
}

async function signOut(page: Page) {
  await Promise.all([page.waitForURL((u) => u.pathname === "/sign-in", { timeout: 60_000 }), page.getByRole("button", { name: "Sign out" }).click()]);
}

describe("an Owner's shell", () => {
  it("one logo everywhere, a sticky sidebar, full group names, sign-out, and the last-used group after signing in again", async () => {
    const page = await browser.newPage();
    await page.goto(url("/"));
    const landingMark = await logoMark(page);
    await page.goto(url("/sign-in"));
    expect(await logoMark(page)).toBe(landingMark);

    // A lab member's first sign-in in this browser starts in the lab.
    await signInThroughForm(page, "owner");
    await expect.poll(() => activeGroup(page), { timeout: 30_000 }).toBe(LAB);
    expect(await logoMark(page)).toBe(landingMark);
    // Names are shown whole: each group's button is as wide as it needs (no clipped text).
    for (const b of await page.getByTestId("group-selector").getByRole("button").all()) {
      const clipped = await b.evaluate((el) => el.scrollWidth > el.clientWidth + 1);
      expect(clipped, await b.innerText()).toBe(false);
    }
    expect(await page.getByTestId("group-selector").innerText()).toContain("Personal group");

    // A long page: the sidebar stays at the top of the window while the page scrolls.
    await page.goto(url(`/networks/${await labNetworkId()}`));
    await page.locator("#sweep").waitFor();
    await page.evaluate(() => window.scrollTo(0, document.documentElement.scrollHeight));
    await expect.poll(() => page.evaluate(() => window.scrollY)).toBeGreaterThan(500);
    const top = await page.getByTestId("sidebar").evaluate((el) => el.getBoundingClientRect().top);
    expect(Math.abs(top)).toBeLessThan(1);
    expect(await seriousViolations(page)).toEqual([]);
    await screenshot(page, "journey-owner-long-page.png", { fullPage: false });

    // Switch to the personal group, sign out with the control, sign in: back in the personal group.
    await page.getByTestId("group-selector").getByRole("button", { name: "Personal group" }).click();
    await page.waitForURL(/\/networks$/);
    await expect.poll(() => activeGroup(page), { timeout: 30_000 }).toBe("Personal group");
    await signOut(page);
    await signInThroughForm(page, "owner");
    await expect.poll(() => activeGroup(page), { timeout: 30_000 }).toBe("Personal group");

    // And back to the lab: the next sign-in starts there again.
    await page.getByTestId("group-selector").getByRole("button", { name: LAB }).click();
    await page.waitForURL(/\/networks$/);
    await expect.poll(() => activeGroup(page), { timeout: 30_000 }).toBe(LAB);
    await signOut(page);
    expect(await page.evaluate(() => fetch("/api/v1/workspace").then((r) => r.status))).toBe(401);
    await signInThroughForm(page, "owner");
    await expect.poll(() => activeGroup(page), { timeout: 30_000 }).toBe(LAB);
    const me = await page.evaluate(() => fetch("/api/v1/workspace").then((r) => r.json()));
    expect(me.workspace.name).toBe(LAB);
    await page.context().close();
  });
});

describe("a Viewer", () => {
  it("sees what they may not do disabled, with the API's reason, and no billing or usage", async () => {
    const page = await browser.signedInPage("viewer");
    // The reason shown is the sentence the API answers with.
    const refused = await api("/api/v1/networks", { as: "viewer", method: "POST", json: { name: "x", network: SMALL_RUN.network } });
    expect(refused.status).toBe(403);
    const reason = ((await refused.json()) as { error: { message: string } }).error.message;
    expect(reason).toMatch(/^Your role \(Viewer\) cannot create networks, calculations, scans, datasets or fits/);

    await page.goto(url("/networks"));
    await page.locator("#new-network-refusal").waitFor();
    expect(await page.locator("#new-network-refusal").innerText()).toBe(reason);
    expect(await page.getByRole("button", { name: "New network" }).isDisabled()).toBe(true);

    await page.goto(url(`/networks/${await labNetworkId()}`));
    for (const id of ["network-refusal", "run-refusal", "scan-refusal"]) {
      await page.locator(`#${id}`).waitFor();
      expect(await page.locator(`#${id}`).innerText(), id).toBe(reason);
      expect(await page.locator(`[aria-describedby="${id}"]`).isDisabled(), id).toBe(true);
    }
    expect(await page.getByRole("button", { name: "Save as new version" }).isDisabled()).toBe(true);
    expect(await page.getByRole("button", { name: "Run conductance" }).isDisabled()).toBe(true);
    expect(await page.getByRole("button", { name: /^Start scan of/ }).isDisabled()).toBe(true);
    expect(await seriousViolations(page)).toEqual([]);
    await screenshot(page, "journey-viewer-network.png");

    await page.goto(url("/datasets/new"));
    await page.locator("#dataset-refusal").waitFor();
    expect(await page.locator("#dataset-refusal").innerText()).toBe(reason);
    expect(await page.getByRole("button", { name: "Save dataset" }).isDisabled()).toBe(true);

    const datasets = (await (await api("/api/v1/datasets", { as: "viewer" })).json()) as { items: { id: string; name: string }[] };
    const lk07 = datasets.items.find((d) => d.name.startsWith("LK-07"))!;
    await page.goto(url(`/datasets/${lk07.id}`));
    await page.locator("#fit-refusal").waitFor();
    expect(await page.locator("#fit-refusal").innerText()).toBe(reason);
    expect(await page.getByRole("button", { name: "Start the fit" }).isDisabled()).toBe(true);
    expect(await seriousViolations(page)).toEqual([]);

    // Billing: nothing fetched or shown but the reason; the API refuses the usage and the overview.
    const usage = await api("/api/v1/usage", { as: "viewer" });
    expect(usage.status).toBe(403);
    const usageReason = ((await usage.json()) as { error: { message: string } }).error.message;
    expect((await api("/api/v1/billing", { as: "viewer" })).status).toBe(403);
    const asked: string[] = [];
    page.on("request", (r) => {
      if (/\/api\/v1\/(usage|billing)/.test(r.url())) asked.push(r.url());
    });
    await page.goto(url("/billing"));
    await page.getByTestId("billing-refused").waitFor();
    expect(await page.getByTestId("refusal").innerText()).toBe(usageReason);
    expect(await page.getByTestId("usage-members").count()).toBe(0);
    expect(await page.locator("main").innerText()).not.toMatch(/Mei Lindqvist|Arjun Salgado|Tomas Varga/);
    expect(asked).toEqual([]);
    expect(
      await page
        .getByRole("navigation", { name: "Main" })
        .getByRole("link", { name: /^Billing/ })
        .count(),
    ).toBe(0);
    expect(await seriousViolations(page)).toEqual([]);
    await screenshot(page, "journey-viewer-billing.png");
    await page.context().close();

    // A Researcher's usage report holds only their own rows; an Owner's every member's.
    const mine = (await (await api("/api/v1/usage", { as: "researcher" })).json()) as { membersShown: string; members: { email: string }[] };
    expect(mine.membersShown).toBe("own");
    expect(mine.members.map((m) => m.email)).toEqual(["researcher@larkspur.example"]);
    const all = (await (await api("/api/v1/usage", { as: "owner" })).json()) as { membersShown: string; members: { email: string }[] };
    expect(all.membersShown).toBe("all");
    expect(all.members.length).toBeGreaterThan(1);
  });
});

describe("a student on the Free plan", () => {
  it("meets the network-size and scan-point limits in the forms, with the way to upgrade, and Free-plan wording", async () => {
    const page = await browser.signedInPage("student");
    await page.goto(url("/networks/new"));
    await fill(page, "name", "Too large for Free");
    await fill(page, "size.columns", 60);
    await fill(page, "size.rows", 60);
    const limit = page.getByTestId("plan-limit");
    await limit.waitFor();
    expect(await limit.innerText()).toMatch(/60 × 60 cells is over the Free plan's 40 × 40/);
    expect(await page.getByRole("button", { name: "Create network" }).isDisabled()).toBe(true);
    const upgrade = limit.getByTestId("upgrade-link");
    expect(await upgrade.getAttribute("href")).toBe("/billing");
    expect(await seriousViolations(page)).toEqual([]);
    await screenshot(page, "journey-student-network-limit.png");
    await fill(page, "size.columns", 12);
    await fill(page, "size.rows", 8);
    await expect.poll(() => limit.count()).toBe(0);
    await expect.poll(() => page.getByRole("button", { name: "Create network" }).isEnabled()).toBe(true);

    // A saved network of the student's: a 150-point scan cannot be started.
    const made = await api("/api/v1/networks", {
      as: "student",
      method: "POST",
      json: { name: `Student scan ${Date.now().toString(36)}`, network: SMALL_RUN.network },
    });
    expect(made.status).toBe(201);
    const { id } = (await made.json()) as { id: string };
    await page.goto(url(`/networks/${id}#sweep`));
    const form = page.getByRole("form", { name: "Build a scan" });
    await form.waitFor();
    await fill(page, "axis0.points", 150);
    const scanLimit = page.getByTestId("scan-limit");
    await scanLimit.waitFor();
    expect(await scanLimit.innerText()).toMatch(/150 points is over the Free plan's 100/);
    expect(await scanLimit.getByTestId("upgrade-link").getAttribute("href")).toBe("/billing");
    expect(await form.getByRole("button", { name: "Start scan of 150 points" }).isDisabled()).toBe(true);
    // Free wording: nothing is charged; the used compute-seconds count against the included minutes.
    const estimates = await page.getByTestId("estimate").allInnerTexts();
    expect(estimates.join(" ")).toContain("Nothing is charged on Free");
    expect(await page.locator("main").innerText()).not.toContain("You are charged");
    expect(await seriousViolations(page)).toEqual([]);
    await screenshot(page, "journey-student-scan-limit.png");
    await fill(page, "axis0.points", 20);
    await expect.poll(() => scanLimit.count()).toBe(0);
    await expect.poll(() => form.getByRole("button", { name: "Start scan of 20 points" }).isEnabled()).toBe(true);
    await api(`/api/v1/networks/${id}`, { as: "student", method: "DELETE" });
    await page.context().close();
  });
});

describe("a newcomer", () => {
  it("finds pricing with navigation and sign-up, the status in words, then an example network and first steps to a first calculation", async () => {
    const page = await browser.newPage();
    await page.goto(url("/pricing"));
    const site = page.getByRole("navigation", { name: "Site" });
    for (const name of ["Pricing", "Model manual", "Service status", "Sign in", "Sign up free"])
      expect(await site.getByRole("link", { name }).count(), name).toBe(1);
    expect(await page.getByTestId("pricing-sign-up").getAttribute("href")).toBe("/sign-up");
    expect(await seriousViolations(page)).toEqual([]);

    await site.getByRole("link", { name: "Service status" }).click();
    await page.waitForURL(/\/status$/);
    expect(await page.locator("h1").innerText()).toBe("Service status");
    expect(await page.getByTestId("status-summary").getAttribute("data-status")).toBe("ok");
    expect(await page.getByTestId("status-database").innerText()).toMatch(/^Working; answered in [\d.]+ ms\./);
    expect(await page.getByTestId("status-queue").innerText()).toMatch(/^Working; answered in [\d.]+ ms\./);
    expect(await page.locator("body").innerText()).not.toContain('"status"');
    expect(await seriousViolations(page)).toEqual([]);
    await screenshot(page, "journey-status.png");

    const email = `newcomer-${Date.now().toString(36)}@fernhill.example`;
    const person = await createStandInUser({ email, name: "Noor Castellan" });
    await signInThroughForm(page, person);
    await expect.poll(() => page.locator("aside").innerText(), { timeout: 30_000 }).toContain("Free plan");
    const steps = page.getByTestId("first-steps");
    await steps.waitFor({ timeout: 30_000 });
    const table = page.getByRole("table", { name: "networks" });
    await table.waitFor();
    expect(await table.locator("tbody tr").count()).toBe(1);
    expect(await table.innerText()).toContain("Example:");
    expect(await table.getByTestId("example-mark").count()).toBe(1);
    expect(await page.getByTestId("pagination").count()).toBe(0);
    expect(await seriousViolations(page)).toEqual([]);
    await screenshot(page, "journey-newcomer-first-steps.png");

    // An empty list: the empty state, and no paging under it.
    await page.goto(url("/runs"));
    await page.getByText("No calculations yet.").waitFor();
    expect(await page.getByTestId("pagination").count()).toBe(0);
    expect(await seriousViolations(page)).toEqual([]);

    // The first steps lead to the first calculation.
    await page.goto(url("/networks"));
    await page.getByTestId("first-calculation").click();
    await page.waitForURL(/\/networks\/[0-9a-f-]{36}#run$/);
    const form = page.getByRole("form", { name: "Start a calculation" });
    await form.getByTestId("estimate").waitFor();
    await form.getByRole("button", { name: "Run conductance" }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
    await expect.poll(() => page.getByRole("progressbar", { name: "Calculation progress" }).getAttribute("aria-valuenow"), { timeout: 90_000 }).toBe("100");
    await page.goto(url("/networks"));
    await page.getByRole("table", { name: "networks" }).waitFor();
    await expect.poll(() => steps.count(), { timeout: 15_000 }).toBe(0);
    await page.context().close();
  });
});
