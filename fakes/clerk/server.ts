// Local stand-in for the hosted sign-in service (Clerk's Frontend and Backend APIs), for
// development and tests only, listening on 127.0.0.1 only. The browser reaches its Frontend API
// same-origin through the Next rewrites under `/__clerk` (NEXT_PUBLIC_CLERK_PROXY_URL), which
// forward the Frontend API paths only; the server SDK reaches the Backend API on CLERK_API_URL.
//
//   Frontend API (clerk-js):  /v1/environment, /v1/client, /v1/client/sign_ins, /v1/client/sign_ups,
//                             /v1/client/sessions/:sid/{touch,tokens,end,remove}, /v1/me/...,
//                             /v1/client/handshake
//   Backend API (server SDK): /v1/jwks, /v1/users, /v1/users/:id, /v1/users/:id/organization_memberships,
//                             /v1/organizations, /v1/organizations/:id, .../memberships
//   Test helpers:             POST /__fake/session {email, password, organizationId?} -> cookies
//                             GET /__fake/health
//
// Demo people and the demo lab come from src/server/demo/scenario.ts. Every change to users,
// organizations and memberships is also sent as a signed webhook (Standard Webhooks / svix
// scheme) to CLERK_WEBHOOK_URL when that is set.
import { createHmac, createPrivateKey, createPublicKey, generateKeyPairSync, randomUUID, sign, type KeyObject } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { createServer, type IncomingMessage, type ServerResponse } from "node:http";
import { dirname } from "node:path";
import { clientJson, environmentJson, membershipJson, orgJson, sessionJson, signInJson, signUpJson, userJson } from "./json";
import { newId, Store, type FakeClient, type FakeSession } from "./state";

const PORT = Number(process.env.CLERK_FAKE_PORT ?? "3003");
const APP_URL = (process.env.APP_URL ?? "http://127.0.0.1:3000").replace(/\/$/, "");
const STATE_FILE = process.env.CLERK_FAKE_STATE_FILE;
const KEY_FILE = process.env.CLERK_FAKE_KEY_FILE;
const WEBHOOK_URL = process.env.CLERK_WEBHOOK_URL;
const WEBHOOK_SECRET = process.env.CLERK_WEBHOOK_SECRET;
/** The Backend API answers only this key (the app's CLERK_SECRET_KEY); unset: any sk_ key. */
const SECRET_KEY = process.env.CLERK_SECRET_KEY;
/** Host encoded in the publishable key; `iss` of every session token is https:// + this. */
const FRONTEND_HOST = process.env.CLERK_FAKE_FRONTEND_HOST ?? "clerk.triskel.local";
const TOKEN_LIFETIME_S = Number(process.env.CLERK_FAKE_TOKEN_LIFETIME_S ?? "300");

const store = new Store(STATE_FILE);

// ---------------------------------------------------------------- signing key (RS256)
function loadKey(): KeyObject {
  if (KEY_FILE && existsSync(KEY_FILE)) return createPrivateKey(readFileSync(KEY_FILE, "utf8"));
  const { privateKey } = generateKeyPairSync("rsa", { modulusLength: 2048 });
  if (KEY_FILE) {
    mkdirSync(dirname(KEY_FILE), { recursive: true });
    writeFileSync(KEY_FILE, privateKey.export({ type: "pkcs8", format: "pem" }), { mode: 0o600 });
  }
  return privateKey;
}
const privateKey = loadKey();
const KID = "ins_triskel_local";
const jwk = { ...(createPublicKey(privateKey).export({ format: "jwk" }) as Record<string, string>), kid: KID, alg: "RS256", use: "sig" };

const b64url = (v: string | Buffer) => Buffer.from(v).toString("base64url");
function signJwt(payload: Record<string, unknown>): string {
  const head = b64url(JSON.stringify({ alg: "RS256", typ: "JWT", kid: KID }));
  const body = b64url(JSON.stringify(payload));
  const sig = sign("RSA-SHA256", Buffer.from(`${head}.${body}`), privateKey);
  return `${head}.${body}.${b64url(sig)}`;
}

function sessionToken(s: FakeSession): string {
  const iat = Math.floor(Date.now() / 1000);
  const claims: Record<string, unknown> = {
    azp: APP_URL,
    iss: `https://${FRONTEND_HOST}`,
    sub: s.userId,
    sid: s.id,
    iat,
    nbf: iat - 5,
    exp: iat + TOKEN_LIFETIME_S,
    v: 2,
    sts: "active",
    fva: [0, -1],
  };
  if (s.lastActiveOrgId) {
    const org = store.org(s.lastActiveOrgId);
    const m = store.membership(s.lastActiveOrgId, s.userId);
    if (org && m) claims.o = { id: org.id, rol: m.role.replace(/^org:/, ""), slg: org.slug };
  }
  return signJwt(claims);
}

// ---------------------------------------------------------------- webhooks out
async function emit(type: string, data: unknown) {
  if (!WEBHOOK_URL || !WEBHOOK_SECRET) return;
  const id = `msg_${randomUUID().replace(/-/g, "")}`;
  const body = JSON.stringify({ type, object: "event", data, timestamp: Date.now() });
  const ts = Math.floor(Date.now() / 1000).toString();
  const key = Buffer.from(WEBHOOK_SECRET.replace(/^whsec_/, ""), "base64");
  const signature = createHmac("sha256", key).update(`${id}.${ts}.${body}`).digest("base64");
  for (let attempt = 0; attempt < 5; attempt++) {
    try {
      const res = await fetch(WEBHOOK_URL, {
        method: "POST",
        headers: { "content-type": "application/json", "svix-id": id, "svix-timestamp": ts, "svix-signature": `v1,${signature}` },
        body,
      });
      if (res.ok) return;
    } catch {
      // the web app may not be up yet
    }
    await new Promise((r) => setTimeout(r, 500 * 2 ** attempt));
  }
  console.error(`[clerk-fake] webhook ${type} ${id} was not accepted after 5 attempts`);
}
const emitLater = (type: string, data: unknown) => void emit(type, data);

// ---------------------------------------------------------------- HTTP plumbing
interface Ctx {
  req: IncomingMessage;
  res: ServerResponse;
  url: URL;
  method: string;
  body: Record<string, unknown>;
  cookies: Record<string, string>;
  setCookies: string[];
}

function parseCookies(header: string | undefined): Record<string, string> {
  const out: Record<string, string> = {};
  for (const part of (header ?? "").split(";")) {
    const i = part.indexOf("=");
    if (i > 0) out[part.slice(0, i).trim()] = decodeURIComponent(part.slice(i + 1).trim());
  }
  return out;
}

async function readBody(req: IncomingMessage): Promise<Record<string, unknown>> {
  const chunks: Buffer[] = [];
  for await (const c of req) chunks.push(c as Buffer);
  const text = Buffer.concat(chunks).toString("utf8");
  if (!text) return {};
  const type = req.headers["content-type"] ?? "";
  if (type.includes("application/json")) {
    try {
      return JSON.parse(text);
    } catch {
      return {};
    }
  }
  return Object.fromEntries(new URLSearchParams(text));
}

function send(ctx: Ctx, status: number, payload: unknown) {
  const headers: Record<string, string | string[]> = { "content-type": "application/json", "cache-control": "no-store" };
  if (ctx.setCookies.length) headers["set-cookie"] = ctx.setCookies;
  ctx.res.writeHead(status, headers);
  ctx.res.end(JSON.stringify(payload));
}

function clerkError(ctx: Ctx, status: number, code: string, message: string, param?: string) {
  send(ctx, status, { errors: [{ code, message, long_message: message, meta: param ? { param_name: param } : {} }], clerk_trace_id: randomUUID() });
}

const COOKIE_ATTRS = "Path=/; SameSite=Lax";
function setSessionCookies(ctx: Ctx, client: FakeClient) {
  ctx.setCookies.push(`__client=${client.id}; ${COOKIE_ATTRS}; HttpOnly; Max-Age=${30 * 24 * 3600}`);
  const s = client.lastActiveSessionId ? store.session(client.lastActiveSessionId) : undefined;
  if (s && s.status === "active") {
    ctx.setCookies.push(`__session=${sessionToken(s)}; ${COOKIE_ATTRS}; Max-Age=${TOKEN_LIFETIME_S}`);
    ctx.setCookies.push(`__client_uat=${client.uat}; ${COOKIE_ATTRS}; Max-Age=${30 * 24 * 3600}`);
  } else {
    ctx.setCookies.push(`__session=; ${COOKIE_ATTRS}; Max-Age=0`);
    ctx.setCookies.push(`__client_uat=0; ${COOKIE_ATTRS}; Max-Age=${30 * 24 * 3600}`);
  }
}

function currentClient(ctx: Ctx, create: boolean): FakeClient | undefined {
  const existing = store.client(ctx.cookies.__client);
  if (existing || !create) return existing;
  const c = store.newClient();
  ctx.setCookies.push(`__client=${c.id}; ${COOKIE_ATTRS}; HttpOnly; Max-Age=${30 * 24 * 3600}`);
  return c;
}

function clientPayload(c: FakeClient | undefined) {
  return c ? clientJson(store, c, sessionToken) : null;
}
function fapi(ctx: Ctx, response: unknown, c: FakeClient | undefined, status = 200) {
  send(ctx, status, { response, client: clientPayload(c) });
}

// ---------------------------------------------------------------- Frontend API
function completeSignIn(ctx: Ctx, c: FakeClient, userId: string) {
  const s = store.startSession(c, userId);
  c.signIn = { ...(c.signIn ?? { id: newId("sia"), identifier: "" }), userId, status: "complete", createdSessionId: s.id };
  store.save();
  setSessionCookies(ctx, c);
}

async function frontend(ctx: Ctx, parts: string[]): Promise<boolean> {
  const { method, body } = ctx;
  const route = parts.join("/");

  if (route === "environment") {
    send(ctx, 200, environmentJson(APP_URL));
    return true;
  }
  if (route === "client" && method === "GET") {
    const c = currentClient(ctx, false);
    if (c) setSessionCookies(ctx, c);
    fapi(ctx, clientPayload(c), c);
    return true;
  }
  if (route === "client" && (method === "POST" || method === "PUT")) {
    const c = currentClient(ctx, true)!;
    fapi(ctx, clientPayload(c), c);
    return true;
  }
  if (route === "client" && method === "DELETE") {
    const c = currentClient(ctx, false);
    if (c) store.endSessions(c);
    if (c) setSessionCookies(ctx, c);
    fapi(ctx, clientPayload(c), c);
    return true;
  }

  // Sign-in: identifier + password in one call, or identifier first then attempt_first_factor.
  if (route === "client/sign_ins" && method === "POST") {
    const c = currentClient(ctx, true)!;
    const identifier = String(body.identifier ?? body.email_address ?? "").trim();
    if (!identifier) return (clerkError(ctx, 422, "form_param_missing", "Enter your e-mail address.", "identifier"), true);
    const user = store.userByEmail(identifier);
    if (!user) return (clerkError(ctx, 422, "form_identifier_not_found", "No account has that e-mail address.", "identifier"), true);
    c.signIn = { id: newId("sia"), identifier, userId: user.id, status: "needs_first_factor", createdSessionId: null };
    if (body.password !== undefined) {
      if (body.password !== user.password) return (clerkError(ctx, 422, "form_password_incorrect", "Password is incorrect.", "password"), true);
      completeSignIn(ctx, c, user.id);
    }
    store.save();
    fapi(ctx, signInJson(store, c), c);
    return true;
  }
  const siMatch = route.match(/^client\/sign_ins\/([^/]+)(?:\/(attempt_first_factor|prepare_first_factor))?$/);
  if (siMatch) {
    const c = currentClient(ctx, false);
    if (!c?.signIn || c.signIn.id !== siMatch[1]) return (clerkError(ctx, 404, "resource_not_found", "No such sign-in attempt."), true);
    if (siMatch[2] === "attempt_first_factor") {
      const user = c.signIn.userId ? store.user(c.signIn.userId) : undefined;
      if (!user || body.strategy !== "password" || body.password !== user.password)
        return (clerkError(ctx, 422, "form_password_incorrect", "Password is incorrect.", "password"), true);
      completeSignIn(ctx, c, user.id);
    }
    fapi(ctx, signInJson(store, c), c);
    return true;
  }

  // Sign-up with e-mail and password; no e-mail verification in the stand-in.
  const suMatch = route.match(/^client\/sign_ups(?:\/([^/]+))?(?:\/(prepare_verification|attempt_verification))?$/);
  if (suMatch && (method === "POST" || method === "PATCH")) {
    const c = currentClient(ctx, true)!;
    if (!suMatch[1] || !c.signUp)
      c.signUp = {
        id: newId("sua"),
        email: null,
        firstName: null,
        lastName: null,
        password: null,
        status: "missing_requirements",
        createdUserId: null,
        createdSessionId: null,
      };
    const su = c.signUp;
    if (body.email_address !== undefined) su.email = String(body.email_address).trim().toLowerCase();
    if (body.first_name !== undefined) su.firstName = String(body.first_name);
    if (body.last_name !== undefined) su.lastName = String(body.last_name);
    if (body.password !== undefined) su.password = String(body.password);
    if (su.email && !/^[^@\s]+@[^@\s]+\.[^@\s]+$/.test(su.email))
      return (clerkError(ctx, 422, "form_param_format_invalid", "Enter a valid e-mail address.", "email_address"), true);
    if (su.email && store.userByEmail(su.email))
      return (clerkError(ctx, 422, "form_identifier_exists", "That e-mail address is taken; sign in instead.", "email_address"), true);
    if (su.password !== null && su.password.length < 8)
      return (clerkError(ctx, 422, "form_password_length_too_short", "Passwords must be 8 characters or more.", "password"), true);
    if (su.email && su.password && su.status !== "complete") {
      const user = store.createUser({ email: su.email, password: su.password, firstName: su.firstName ?? "", lastName: su.lastName ?? "" });
      const s = store.startSession(c, user.id);
      su.status = "complete";
      su.createdUserId = user.id;
      su.createdSessionId = s.id;
      setSessionCookies(ctx, c);
      emitLater("user.created", userJson(store, user));
    }
    store.save();
    fapi(ctx, signUpJson(c), c);
    return true;
  }

  const sMatch = route.match(/^client\/sessions\/([^/]+)(?:\/(touch|tokens|end|remove)(?:\/([^/]+))?)?$/);
  if (sMatch) {
    const c = currentClient(ctx, false);
    const s = sMatch[1] ? store.session(sMatch[1]) : undefined;
    if (!c || !s || s.clientId !== c.id || s.status !== "active") {
      if (c) setSessionCookies(ctx, { ...c, lastActiveSessionId: null });
      return (clerkError(ctx, 401, "authentication_invalid", "Session is not active; sign in again."), true);
    }
    const action = sMatch[2];
    if (action === "touch" || (!action && method === "POST")) {
      if ("active_organization_id" in body) {
        const orgId = body.active_organization_id ? String(body.active_organization_id) : null;
        if (orgId && !store.membership(orgId, s.userId))
          return (clerkError(ctx, 403, "not_a_member_in_organization", "You are not a member of that organization."), true);
        s.lastActiveOrgId = orgId;
      }
      s.updatedAt = Date.now();
      c.lastActiveSessionId = s.id;
      store.save();
      setSessionCookies(ctx, c);
      fapi(ctx, sessionJson(store, s, sessionToken(s)), c);
      return true;
    }
    if (action === "tokens") {
      if ("organization_id" in body) {
        const orgId = body.organization_id ? String(body.organization_id) : null;
        if (!orgId || store.membership(orgId, s.userId)) s.lastActiveOrgId = orgId;
        store.save();
      }
      setSessionCookies(ctx, c);
      send(ctx, 200, { object: "token", jwt: sessionToken(s) });
      return true;
    }
    if (action === "end" || action === "remove") {
      store.endSessions(c);
      setSessionCookies(ctx, c);
      fapi(ctx, { ...sessionJson(store, s, ""), status: action === "end" ? "ended" : "removed" }, c);
      return true;
    }
  }
  if (route === "client/sessions" && method === "DELETE") {
    const c = currentClient(ctx, false);
    if (c) {
      store.endSessions(c);
      setSessionCookies(ctx, c);
    }
    fapi(ctx, clientPayload(c), c);
    return true;
  }

  if (route === "client/handshake") {
    const c = currentClient(ctx, false);
    if (c) setSessionCookies(ctx, c);
    else ctx.setCookies.push(`__session=; ${COOKIE_ATTRS}; Max-Age=0`, `__client_uat=0; ${COOKIE_ATTRS}; Max-Age=${30 * 24 * 3600}`);
    const back = ctx.url.searchParams.get("redirect_url") ?? APP_URL;
    const target = back.startsWith(APP_URL) ? back : APP_URL;
    ctx.res.writeHead(307, { location: target, "cache-control": "no-store", "set-cookie": ctx.setCookies });
    ctx.res.end();
    return true;
  }

  if (parts[0] === "me") {
    const c = currentClient(ctx, false);
    const s = c?.lastActiveSessionId ? store.session(c.lastActiveSessionId) : undefined;
    if (!c || !s || s.status !== "active") return (clerkError(ctx, 401, "authentication_invalid", "Sign in first."), true);
    if (route === "me") return (fapi(ctx, userJson(store, store.user(s.userId)!), c), true);
    if (route === "me/organization_memberships") {
      const data = store.membershipsOfUser(s.userId).map((m) => membershipJson(store, m));
      fapi(ctx, { data, total_count: data.length }, c);
      return true;
    }
    if (route === "me/organization_invitations" || route === "me/organization_suggestions") {
      fapi(ctx, { data: [], total_count: 0 }, c);
      return true;
    }
  }
  return false;
}

// ---------------------------------------------------------------- Backend API
function paged<T>(ctx: Ctx, items: T[]) {
  const limit = Number(ctx.url.searchParams.get("limit") ?? "100");
  const offset = Number(ctx.url.searchParams.get("offset") ?? "0");
  send(ctx, 200, { data: items.slice(offset, offset + limit), total_count: items.length });
}

async function backend(ctx: Ctx, parts: string[]): Promise<boolean> {
  const { method, body } = ctx;
  if (parts[0] === "jwks") return (send(ctx, 200, { keys: [jwk] }), true);
  // The instance's own secret key, not any sk_ string (the app's origin never forwards these paths).
  const auth = ctx.req.headers.authorization ?? "";
  const keyOk = SECRET_KEY ? auth === `Bearer ${SECRET_KEY}` : auth.startsWith("Bearer sk_");
  if (!keyOk)
    return (clerkError(ctx, 401, "authentication_invalid", "Send the instance's secret key (CLERK_SECRET_KEY) as `Authorization: Bearer sk_...`."), true);

  if (parts[0] === "users") {
    if (parts.length === 1 && method === "GET") {
      const emails = ctx.url.searchParams.getAll("email_address").map((e) => e.toLowerCase());
      const users = store.state.users.filter((u) => !emails.length || emails.includes(u.email.toLowerCase()));
      send(
        ctx,
        200,
        users.map((u) => userJson(store, u)),
      );
      return true;
    }
    if (parts.length === 1 && method === "POST") {
      const email = String((Array.isArray(body.email_address) ? body.email_address[0] : body.email_address) || "");
      if (!email) return (clerkError(ctx, 422, "form_param_missing", "email_address is required", "email_address"), true);
      if (store.userByEmail(email)) return (clerkError(ctx, 422, "form_identifier_exists", "That e-mail address is taken.", "email_address"), true);
      const u = store.createUser({
        email,
        password: body.password == null ? null : String(body.password),
        firstName: String(body.first_name ?? ""),
        lastName: String(body.last_name ?? ""),
      });
      emitLater("user.created", userJson(store, u));
      send(ctx, 200, userJson(store, u));
      return true;
    }
    const u = store.user(parts[1]);
    if (!u) return (clerkError(ctx, 404, "resource_not_found", "No such user."), true);
    if (parts.length === 2 && method === "GET") return (send(ctx, 200, userJson(store, u)), true);
    if (parts[2] === "organization_memberships")
      return (
        paged(
          ctx,
          store.membershipsOfUser(u.id).map((m) => membershipJson(store, m)),
        ),
        true
      );
  }

  if (parts[0] === "organizations") {
    if (parts.length === 1 && method === "POST") {
      const t = Date.now();
      const name = String(body.name ?? "").trim();
      if (!name) return (clerkError(ctx, 422, "form_param_missing", "name is required", "name"), true);
      const o = {
        id: newId("org"),
        name,
        slug: String(body.slug ?? name.toLowerCase().replace(/[^a-z0-9]+/g, "-")),
        createdBy: body.created_by == null ? null : String(body.created_by),
        createdAt: t,
        updatedAt: t,
      };
      store.state.orgs.push(o);
      if (o.createdBy && store.user(o.createdBy))
        store.state.memberships.push({ id: newId("orgmem"), orgId: o.id, userId: o.createdBy, role: "org:owner", createdAt: t, updatedAt: t });
      store.save();
      emitLater("organization.created", orgJson(store, o));
      send(ctx, 200, orgJson(store, o));
      return true;
    }
    const o = store.org(parts[1]) ?? store.state.orgs.find((x) => x.slug === parts[1]);
    if (!o) return (clerkError(ctx, 404, "resource_not_found", "No such organization."), true);
    if (parts.length === 2 && method === "GET") return (send(ctx, 200, orgJson(store, o)), true);
    if (parts[2] === "memberships") {
      if (parts.length === 3 && method === "GET")
        return (
          paged(
            ctx,
            store.membershipsOfOrg(o.id).map((m) => membershipJson(store, m)),
          ),
          true
        );
      if (parts.length === 3 && method === "POST") {
        const userId = String(body.user_id ?? "");
        if (!store.user(userId)) return (clerkError(ctx, 404, "resource_not_found", "No such user.", "user_id"), true);
        if (store.membership(o.id, userId)) return (clerkError(ctx, 422, "already_a_member_in_organization", "Already a member.", "user_id"), true);
        const t = Date.now();
        const m = { id: newId("orgmem"), orgId: o.id, userId, role: String(body.role ?? "org:viewer"), createdAt: t, updatedAt: t };
        store.state.memberships.push(m);
        store.save();
        emitLater("organizationMembership.created", membershipJson(store, m));
        send(ctx, 200, membershipJson(store, m));
        return true;
      }
      const m = store.membership(o.id, parts[3]);
      if (!m) return (clerkError(ctx, 404, "resource_not_found", "No such membership."), true);
      if (method === "PATCH") {
        m.role = String(body.role ?? m.role);
        m.updatedAt = Date.now();
        store.save();
        emitLater("organizationMembership.updated", membershipJson(store, m));
        send(ctx, 200, membershipJson(store, m));
        return true;
      }
      if (method === "DELETE") {
        const json = membershipJson(store, m);
        store.state.memberships = store.state.memberships.filter((x) => x !== m);
        for (const s of store.state.sessions) if (s.userId === m.userId && s.lastActiveOrgId === o.id) s.lastActiveOrgId = null;
        store.save();
        emitLater("organizationMembership.deleted", json);
        send(ctx, 200, json);
        return true;
      }
    }
  }
  return false;
}

// ---------------------------------------------------------------- test helpers
async function helpers(ctx: Ctx, parts: string[]): Promise<boolean> {
  if (parts[0] === "health") return (send(ctx, 200, { ok: true, users: store.state.users.length }), true);
  if (parts[0] === "session" && ctx.method === "POST") {
    const user = store.userByEmail(String(ctx.body.email ?? ""));
    if (!user || user.password !== ctx.body.password) return (clerkError(ctx, 422, "form_password_incorrect", "Unknown e-mail or wrong password."), true);
    const c = store.newClient();
    const s = store.startSession(c, user.id);
    if (ctx.body.organizationId) {
      if (!store.membership(String(ctx.body.organizationId), user.id)) return (clerkError(ctx, 403, "not_a_member_in_organization", "Not a member."), true);
      s.lastActiveOrgId = String(ctx.body.organizationId);
      store.save();
    }
    const cookies = { __client: c.id, __session: sessionToken(s), __client_uat: String(c.uat) };
    send(ctx, 200, { userId: user.id, sessionId: s.id, cookies });
    return true;
  }
  return false;
}

const server = createServer(async (req, res) => {
  const url = new URL(req.url ?? "/", "http://stand-in.local");
  const ctx: Ctx = {
    req,
    res,
    url,
    method: (url.searchParams.get("_method") ?? req.method ?? "GET").toUpperCase(),
    body: {},
    cookies: parseCookies(req.headers.cookie),
    setCookies: [],
  };
  try {
    ctx.body = await readBody(req);
    const parts = url.pathname.split("/").filter(Boolean);
    let handled = false;
    if (parts[0] === "__fake") handled = await helpers(ctx, parts.slice(1));
    else if (parts[0] === "v1") handled = (await frontend(ctx, parts.slice(1))) || (await backend(ctx, parts.slice(1)));
    if (!handled) clerkError(ctx, 404, "resource_not_found", `The sign-in stand-in has no ${ctx.method} ${url.pathname}.`);
  } catch (err) {
    console.error("[clerk-fake]", err);
    if (!res.headersSent) clerkError(ctx, 500, "internal", String(err));
  }
  if (process.env.CLERK_FAKE_LOG === "1") console.log(`${ctx.method} ${url.pathname} -> ${res.statusCode}`);
});

server.listen(PORT, "127.0.0.1", () => {
  console.log(`[clerk-fake] listening on 127.0.0.1:${PORT} (${store.state.users.length} users, ${store.state.orgs.length} organizations)`);
});
for (const sig of ["SIGTERM", "SIGINT"]) process.on(sig, () => server.close(() => process.exit(0)));
