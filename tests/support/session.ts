/**
 * Signing in as a demo person in tests (accounts, docs/accounts.md).
 *
 *   import { signInPage, signInThroughForm, sessionCookies, sessionFetch } from "../support/session";
 *
 *   // Browser, fast: cookies from the sign-in stand-in, then the page is signed in.
 *   const page = await browser.newPage();
 *   await signInPage(page, "owner");                    // lab workspace (the demo lab is active)
 *   await signInPage(page, "student");                  // personal workspace (no organization)
 *   await signInPage(page, "researcher", { workspace: "personal" });
 *   await page.goto(`${appUrl()}/networks`);
 *
 *   // Browser, through the real sign-in page (what a person does; slower):
 *   await signInThroughForm(page, "viewer");            // ends on /networks (or `redirectTo`)
 *
 *   // Without a browser: API calls with a session instead of an API token.
 *   const res = await sessionFetch("owner", "/api/v1/workspace/members");
 *
 *   // A person who is not in the demo data: create them at the stand-in first.
 *   const person = await createStandInUser({ email: "new@example.org", name: "New Person" });
 *   await sessionFetch(person, "/api/v1/workspace", { organizationId: "org_demo_larkspur" });
 *
 * Keys are the DemoPerson keys of src/server/demo/scenario.ts: owner, billingAdmin, researcher,
 * researcher2, viewer, student. Lab members get the demo lab (org_demo_larkspur) as active
 * workspace unless `workspace: "personal"`. Needs the services of `npm test` (scripts/test.sh).
 */
import type { BrowserContext, Page } from "playwright-core";
import { DEMO_LAB, DEMO_PEOPLE, type DemoPerson } from "../../src/server/demo/scenario";
import { failOnRateLimit } from "./services";

export type DemoPersonKey = DemoPerson["key"];
/** A person who is not in the demo data (createStandInUser), by e-mail and password. */
export type Credentials = { email: string; password: string };

function need(name: string): string {
  const v = process.env[name];
  if (!v) throw new Error(`${name} is not set: run browser and integration tests through \`npm test\` (scripts/test.sh)`);
  return v;
}
const appUrl = () => need("APP_URL");
const clerkFakeUrl = () => need("CLERK_FAKE_URL");

export function demoPerson(key: DemoPersonKey): DemoPerson {
  const p = DEMO_PEOPLE.find((x) => x.key === key);
  if (!p) throw new Error(`no demo person "${key}"; known: ${DEMO_PEOPLE.map((x) => x.key).join(", ")}`);
  return p;
}

export interface SessionOptions {
  /** "lab" (default for lab members): the demo lab is the active organization; "personal": none. */
  workspace?: "lab" | "personal";
  /** Any Clerk organization id to make active (for people who are not demo people). */
  organizationId?: string;
}

/** A fresh session at the stand-in: the three cookies a signed-in browser carries. */
export async function sessionCookies(who: DemoPersonKey | Credentials, opts: SessionOptions = {}) {
  const person = typeof who === "string" ? demoPerson(who) : who;
  const inLab = typeof who === "string" && DEMO_LAB.members.some((m) => m.key === who);
  const organizationId = opts.organizationId ?? (opts.workspace === "personal" || !inLab ? undefined : DEMO_LAB.clerkOrgId);
  const res = await fetch(`${clerkFakeUrl()}/__fake/session`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ email: person.email, password: person.password, organizationId }),
  });
  if (!res.ok) throw new Error(`the sign-in stand-in refused a session for ${person.email}: ${res.status} ${await res.text()}`);
  const body = (await res.json()) as { cookies: Record<string, string>; userId: string; sessionId: string };
  return body;
}

/** Puts a person's session cookies into a browser context (every page in it is signed in). */
export async function signInContext(context: BrowserContext, who: DemoPersonKey | Credentials, opts: SessionOptions = {}): Promise<void> {
  const { cookies } = await sessionCookies(who, opts);
  const url = appUrl();
  await context.clearCookies();
  await context.addCookies(Object.entries(cookies).map(([name, value]) => ({ name, value, url, sameSite: "Lax" as const, httpOnly: name === "__client" })));
}

/** Signs the page's context in as a person (no form); navigate afterwards. */
export async function signInPage(page: Page, who: DemoPersonKey | Credentials, opts: SessionOptions = {}): Promise<void> {
  await signInContext(page.context(), who, opts);
}

/** Signs in through our real sign-in page, as a person would; waits for the page after sign-in. */
export async function signInThroughForm(page: Page, who: DemoPersonKey | Credentials, opts: { redirectTo?: string } = {}): Promise<void> {
  const person = typeof who === "string" ? demoPerson(who) : who;
  const target = opts.redirectTo ?? "/networks";
  await page.goto(`${appUrl()}/sign-in?redirect_url=${encodeURIComponent(target)}`);
  await page.locator('[data-testid="sign-in-form"][data-ready="yes"]').waitFor({ timeout: 60_000 });
  await page.fill("#email", person.email);
  await page.fill("#password", person.password);
  await Promise.all([page.waitForURL((u) => u.pathname === target.split("?")[0], { timeout: 60_000 }), page.click('button[type="submit"]')]);
}

/**
 * fetch against the app with a demo person's session cookies instead of an API token. A 429 fails
 * the test (failOnRateLimit in ./services) unless `rateLimitExpected` says the 429 is what the test
 * is about (tests/integration/rate-limit.test.ts only).
 */
export async function sessionFetch(
  who: DemoPersonKey | Credentials,
  path: string,
  init: RequestInit & { json?: unknown; rateLimitExpected?: boolean } & SessionOptions = {},
): Promise<Response> {
  const { cookies } = await sessionCookies(who, { workspace: init.workspace, organizationId: init.organizationId });
  const headers = new Headers(init.headers);
  headers.set(
    "cookie",
    Object.entries(cookies)
      .map(([k, v]) => `${k}=${v}`)
      .join("; "),
  );
  let body = init.body;
  if (init.json !== undefined) {
    headers.set("content-type", "application/json");
    body = JSON.stringify(init.json);
  }
  const res = await fetch(new URL(path, appUrl()), { ...init, headers, body, redirect: "manual" });
  return init.rateLimitExpected ? res : failOnRateLimit(res, `${init.method ?? "GET"} ${path} (session of ${typeof who === "string" ? who : who.email})`);
}

/** Creates a person at the sign-in stand-in (as if they had signed up); returns their credentials. */
export async function createStandInUser(input: {
  email: string;
  name?: string;
  password?: string;
}): Promise<{ email: string; password: string; clerkUserId: string }> {
  const password = input.password ?? "stand-in-pass-2026";
  const [first, ...rest] = (input.name ?? "Test Person").split(" ");
  const res = await fetch(`${clerkFakeUrl()}/v1/users`, {
    method: "POST",
    headers: { "content-type": "application/json", authorization: `Bearer ${need("CLERK_SECRET_KEY")}` },
    body: JSON.stringify({ email_address: [input.email], password, first_name: first, last_name: rest.join(" ") }),
  });
  if (!res.ok) throw new Error(`the sign-in stand-in refused to create ${input.email}: ${res.status} ${await res.text()}`);
  const user = (await res.json()) as { id: string };
  return { email: input.email, password, clerkUserId: user.id };
}

/** Messages the mail stand-in (maildev) received for one address, newest last. */
export async function mailTo(address: string): Promise<{ subject: string; text: string; html: string }[]> {
  const res = await fetch(`${need("MAIL_WEB_URL")}/email`);
  if (!res.ok) throw new Error(`the mail stand-in answered ${res.status}`);
  const all = (await res.json()) as { to: { address: string }[]; subject: string; text: string; html: string; date: string }[];
  return all.filter((m) => m.to.some((t) => t.address.toLowerCase() === address.toLowerCase())).sort((a, b) => a.date.localeCompare(b.date));
}

/** Waits (up to timeoutMs) for a message to an address and returns the newest. */
export async function waitForMail(address: string, timeoutMs = 15_000) {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const found = await mailTo(address);
    if (found.length) return found[found.length - 1];
    if (Date.now() > until) throw new Error(`no e-mail to ${address} arrived at the mail stand-in within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 250));
  }
}
