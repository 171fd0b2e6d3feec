// HTTP side of the Stripe stand-in: form-encoded requests (nested brackets, indexed arrays),
// JSON errors `{ error: { type, message, code, param } }`, idempotency keys, signed webhook
// delivery, minimal hosted Checkout and portal pages, and test-only control endpoints under /_fake.
// Development and tests only: this is not Stripe.
import { createHash, createHmac } from "node:crypto";
import { existsSync, readFileSync, renameSync, writeFileSync } from "node:fs";
import http from "node:http";
import qs from "qs";
import { FakeApi, type Params } from "./api";
import { checkoutPage, invoicePage, portalPage } from "./pages";
import { FakeError, newId, nowSeconds, Store, type Delivery, type FakeEvent } from "./store";

export const FAKE_API_VERSION = "2026-10-28.endive";

export interface FakeOptions {
  port: number;
  host?: string;
  /** Where webhooks go (the app's endpoint); none means events are only stored. */
  webhookUrl?: string;
  webhookSecret: string;
  /** Secret keys accepted (anything starting with sk_test_ when empty). */
  secretKey?: string;
  /** Keep the state in this JSON file across restarts (a developer's instance; tests leave it unset). */
  stateFile?: string;
  log?: (line: string) => void;
}

const parseForm = (text: string): Params => qs.parse(text, { arrayLimit: 10_000, depth: 12, parameterLimit: 100_000, allowDots: false });

export function signPayload(secret: string, payload: string, timestamp = nowSeconds()): string {
  const sig = createHmac("sha256", secret).update(`${timestamp}.${payload}`, "utf8").digest("hex");
  return `t=${timestamp},v1=${sig}`;
}

export function createFakeStripe(opts: FakeOptions) {
  const host = opts.host ?? "127.0.0.1";
  const publicUrl = `http://${host}:${opts.port}`;
  const log = opts.log ?? (() => {});
  let store = new Store();
  if (opts.stateFile && existsSync(opts.stateFile)) {
    try {
      store = Store.deserialize(readFileSync(opts.stateFile, "utf8"));
      log(`state loaded from ${opts.stateFile}`);
    } catch (err) {
      log(`state file ${opts.stateFile} unreadable (${(err as Error).message}); starting empty`);
    }
  }
  let saveTimer: NodeJS.Timeout | undefined;
  const scheduleSave = () => {
    if (!opts.stateFile || saveTimer) return;
    saveTimer = setTimeout(() => {
      saveTimer = undefined;
      const tmp = `${opts.stateFile}.tmp`;
      writeFileSync(tmp, store.serialize());
      renameSync(tmp, opts.stateFile!);
    }, 200);
  };
  let down = false;
  /** Extra delay before answering meter events (test control, to stop a sender midway). */
  let meterEventDelayMs = 0;
  let chain: Promise<void> = Promise.resolve();

  const emit = (type: string, object: unknown, previous?: Record<string, unknown>): string => {
    const ev: FakeEvent = {
      id: newId("evt"),
      object: "event",
      api_version: FAKE_API_VERSION,
      created: nowSeconds(),
      livemode: false,
      pending_webhooks: opts.webhookUrl ? 1 : 0,
      type: type as FakeEvent["type"],
      // A snapshot: later changes to the object do not rewrite an event already sent.
      data: { object: JSON.parse(JSON.stringify(object)), ...(previous ? { previous_attributes: previous } : {}) },
      request: { id: null, idempotency_key: null },
    };
    store.events.push(ev);
    if (opts.webhookUrl) {
      const d: Delivery = {
        id: newId("whd"),
        eventId: ev.id,
        type,
        attempts: 0,
        status: "pending",
        lastResponseStatus: null,
        lastError: null,
        deliveredAt: null,
      };
      store.deliveries.push(d);
      const owner = store;
      // In order, one at a time, as an endpoint sees them; retried with backoff a few times.
      chain = chain.then(() => deliver(owner, d, ev));
    }
    return ev.id;
  };

  async function sendOnce(d: Delivery, ev: FakeEvent): Promise<boolean> {
    const payload = JSON.stringify(ev, null, 2);
    d.attempts += 1;
    try {
      const res = await fetch(opts.webhookUrl!, {
        method: "POST",
        headers: {
          "content-type": "application/json; charset=utf-8",
          "stripe-signature": signPayload(opts.webhookSecret, payload),
          "user-agent": "Stripe/1.0 (+local stand-in)",
        },
        body: payload,
        signal: AbortSignal.timeout(15_000),
      });
      d.lastResponseStatus = res.status;
      await res.text().catch(() => "");
      if (res.ok) {
        d.status = "delivered";
        d.deliveredAt = Date.now();
        d.lastError = null;
        return true;
      }
      d.lastError = `HTTP ${res.status}`;
    } catch (err) {
      d.lastError = (err as Error).message;
    }
    return false;
  }

  async function deliver(owner: Store, d: Delivery, ev: FakeEvent) {
    const waits = [0, 500, 2000, 5000, 10_000];
    for (const w of waits) {
      if (owner !== store) return; // reset meanwhile
      if (w) await new Promise((r) => setTimeout(r, w));
      if (await sendOnce(d, ev)) return;
    }
    d.status = "failed";
    log(`webhook ${ev.type} ${ev.id} not delivered: ${d.lastError}`);
  }

  const api = () => new FakeApi(store, publicUrl, emit);
  /** Waits until every delivery queued so far is settled (hosted pages use it before redirecting). */
  const drained = async () => {
    let current: Promise<void>;
    do {
      current = chain;
      await current;
    } while (current !== chain);
  };

  function route(method: string, path: string, p: Params): unknown {
    const a = api();
    let m: RegExpExecArray | null;
    const is = (verb: string, re: RegExp) => method === verb && (m = re.exec(path)) !== null;
    if (is("POST", /^\/v1\/customers$/)) return a.createCustomer(p);
    if (is("GET", /^\/v1\/customers$/)) return a.listCustomers(p);
    if (is("GET", /^\/v1\/customers\/([^/]+)$/)) return a.customer(m![1]);
    if (is("POST", /^\/v1\/customers\/([^/]+)$/)) return a.updateCustomer(m![1], p);
    if (is("POST", /^\/v1\/products$/)) return a.createProduct(p);
    if (is("GET", /^\/v1\/products$/)) return a.listProducts(p);
    if (is("GET", /^\/v1\/products\/([^/]+)$/)) return a.product(m![1]);
    if (is("POST", /^\/v1\/prices$/)) return a.createPrice(p);
    if (is("GET", /^\/v1\/prices$/)) return a.listPrices(p);
    if (is("GET", /^\/v1\/prices\/([^/]+)$/)) return a.price(m![1]);
    if (is("POST", /^\/v1\/billing\/meters$/)) return a.createMeter(p);
    if (is("GET", /^\/v1\/billing\/meters$/)) return a.listMeters(p);
    if (is("GET", /^\/v1\/billing\/meters\/([^/]+)$/)) return a.meter(m![1]);
    if (is("GET", /^\/v1\/billing\/meters\/([^/]+)\/event_summaries$/)) return a.meterEventSummaries(m![1], p);
    if (is("POST", /^\/v1\/billing\/meter_events$/)) return a.createMeterEvent(p);
    if (is("POST", /^\/v1\/checkout\/sessions$/)) return a.publicSession(a.createCheckoutSession(p));
    if (is("GET", /^\/v1\/checkout\/sessions\/([^/]+)$/)) return a.publicSession(a.checkoutSession(m![1]));
    if (is("POST", /^\/v1\/billing_portal\/sessions$/)) return a.createPortalSession(p);
    if (is("GET", /^\/v1\/subscriptions$/)) return a.listSubscriptions(p);
    if (is("POST", /^\/v1\/subscriptions$/)) return a.createSubscription(p);
    if (is("GET", /^\/v1\/subscriptions\/([^/]+)$/)) return a.subscription(m![1]);
    if (is("POST", /^\/v1\/subscriptions\/([^/]+)$/)) return a.updateSubscription(m![1], p);
    if (is("DELETE", /^\/v1\/subscriptions\/([^/]+)$/)) return a.cancelSubscription(m![1]);
    if (is("POST", /^\/v1\/invoices\/create_preview$/)) return a.previewInvoice(p);
    if (is("GET", /^\/v1\/invoices$/)) return a.listInvoices(p);
    if (is("GET", /^\/v1\/invoices\/([^/]+)$/)) return a.invoice(m![1]);
    if (is("GET", /^\/v1\/events$/)) return { object: "list", data: [...store.events].reverse().slice(0, 100), has_more: false, url: "/v1/events" };
    if (is("GET", /^\/v1\/events\/([^/]+)$/)) {
      const ev = store.events.find((e) => e.id === m![1]);
      if (!ev) throw new FakeError(404, "invalid_request_error", `No such event: '${m![1]}'`, "resource_missing", "id");
      return ev;
    }
    throw new FakeError(
      404,
      "invalid_request_error",
      `Unrecognized request URL (${method}: ${path}). This local stand-in implements only the endpoints Triskel uses.`,
    );
  }

  function sendJson(res: http.ServerResponse, status: number, body: unknown, extra: Record<string, string> = {}) {
    res.writeHead(status, { "content-type": "application/json", "request-id": newId("req"), "stripe-version": FAKE_API_VERSION, ...extra });
    res.end(JSON.stringify(body));
  }
  function sendError(res: http.ServerResponse, err: FakeError) {
    sendJson(res, err.status, {
      error: { type: err.type, message: err.message, ...(err.code ? { code: err.code } : {}), ...(err.param ? { param: err.param } : {}) },
    });
  }
  function sendHtml(res: http.ServerResponse, status: number, html: string) {
    res.writeHead(status, { "content-type": "text/html; charset=utf-8" });
    res.end(html);
  }
  const redirect = (res: http.ServerResponse, to: string) => {
    res.writeHead(303, { location: to });
    res.end();
  };

  async function handleApi(req: http.IncomingMessage, res: http.ServerResponse, url: URL, body: string) {
    const auth = req.headers.authorization ?? "";
    const key = /^Bearer\s+(\S+)$/.exec(auth)?.[1] ?? "";
    if (!key || (opts.secretKey ? key !== opts.secretKey : !key.startsWith("sk_test_"))) {
      return sendError(res, new FakeError(401, "authentication_error", "Invalid API Key provided: " + (key ? key.slice(0, 8) + "****" : "(none)")));
    }
    const method = (req.method ?? "GET").toUpperCase();
    const params = method === "POST" ? parseForm(body) : parseForm(url.search.slice(1));
    const idemKey = method === "POST" ? (req.headers["idempotency-key"] as string | undefined) : undefined;
    const fingerprint = createHash("sha256").update(body).digest("hex");
    if (idemKey) {
      const prior = store.idempotency.get(idemKey);
      if (prior) {
        if (prior.method !== method || prior.path !== url.pathname || prior.body !== fingerprint) {
          return sendError(
            res,
            new FakeError(
              400,
              "idempotency_error",
              `Keys for idempotent requests can only be used with the same parameters they were first used with. ` +
                `Try using a key other than '${idemKey}' if you meant to execute a different request.`,
            ),
          );
        }
        return sendJson(res, prior.status, prior.response, { "idempotent-replayed": "true", "idempotency-key": idemKey });
      }
    }
    let status = 200;
    let response: unknown;
    try {
      response = route(method, url.pathname, params);
    } catch (err) {
      if (!(err instanceof FakeError)) throw err;
      status = err.status;
      response = { error: { type: err.type, message: err.message, ...(err.code ? { code: err.code } : {}), ...(err.param ? { param: err.param } : {}) } };
    }
    // Stripe stores the outcome of a keyed request unless it was a server error.
    if (idemKey && status < 500) store.idempotency.set(idemKey, { method, path: url.pathname, body: fingerprint, status, response });
    if (url.pathname === "/v1/billing/meter_events" && meterEventDelayMs > 0) await new Promise((r) => setTimeout(r, meterEventDelayMs));
    sendJson(res, status, response, idemKey ? { "idempotency-key": idemKey } : {});
  }

  async function handleControl(req: http.IncomingMessage, res: http.ServerResponse, url: URL, body: string) {
    const method = (req.method ?? "GET").toUpperCase();
    const json = body.trim() ? (JSON.parse(body) as Record<string, unknown>) : {};
    const p = url.pathname;
    let m: RegExpExecArray | null;
    if (p === "/_fake/health") return sendJson(res, 200, { ok: true, down, apiVersion: FAKE_API_VERSION });
    if (method === "POST" && p === "/_fake/reset") {
      store = new Store();
      down = false;
      meterEventDelayMs = 0;
      return sendJson(res, 200, { reset: true });
    }
    if (method === "POST" && p === "/_fake/down") {
      down = true;
      return sendJson(res, 200, { down });
    }
    if (method === "POST" && p === "/_fake/up") {
      down = false;
      return sendJson(res, 200, { down });
    }
    if (method === "POST" && p === "/_fake/meter_event_delay") {
      meterEventDelayMs = Math.max(0, Math.min(10_000, Number(json.delayMs ?? 0)));
      return sendJson(res, 200, { meterEventDelayMs });
    }
    if (method === "GET" && p === "/_fake/deliveries") {
      const type = url.searchParams.get("type");
      return sendJson(res, 200, { data: store.deliveries.filter((d) => !type || d.type === type) });
    }
    if (method === "GET" && p === "/_fake/events") {
      return sendJson(res, 200, { data: store.events });
    }
    if (method === "POST" && (m = /^\/_fake\/deliveries\/([^/]+)\/resend$/.exec(p))) {
      const d = store.deliveries.find((x) => x.id === m![1] || x.eventId === m![1]);
      const ev = d && store.events.find((e) => e.id === d.eventId);
      if (!d || !ev) return sendError(res, new FakeError(404, "invalid_request_error", `No such delivery: '${m[1]}'`, "resource_missing"));
      const ok = await sendOnce(d, ev);
      return sendJson(res, 200, { resent: ok, delivery: d });
    }
    if (method === "GET" && p === "/_fake/meter_events") {
      const customer = url.searchParams.get("customer");
      return sendJson(res, 200, { data: store.meterEvents.filter((e) => !customer || Object.values(e.payload).includes(customer)) });
    }
    if (method === "POST" && (m = /^\/_fake\/subscriptions\/([^/]+)\/advance_period$/.exec(p))) {
      try {
        const invoice = api().advancePeriod(m[1]);
        await drained();
        return sendJson(res, 200, { invoice });
      } catch (err) {
        if (err instanceof FakeError) return sendError(res, err);
        throw err;
      }
    }
    if (method === "POST" && (m = /^\/_fake\/customers\/([^/]+)\/payments$/.exec(p))) {
      if (!store.customers.has(m[1])) return sendError(res, new FakeError(404, "invalid_request_error", `No such customer: '${m[1]}'`, "resource_missing"));
      if (json.fail === true) store.failingCustomers.add(m[1]);
      else api().fixPayment(m[1]);
      await drained();
      return sendJson(res, 200, { customer: m[1], failing: store.failingCustomers.has(m[1]) });
    }
    if (method === "POST" && p === "/_fake/drain") {
      await drained();
      return sendJson(res, 200, { drained: true });
    }
    return sendError(res, new FakeError(404, "invalid_request_error", `Unknown control endpoint ${method} ${p}`));
  }

  async function handlePages(req: http.IncomingMessage, res: http.ServerResponse, url: URL, body: string) {
    const method = (req.method ?? "GET").toUpperCase();
    let m: RegExpExecArray | null;
    const a = api();
    try {
      if ((m = /^\/checkout\/([^/]+)$/.exec(url.pathname)) && method === "GET") {
        const s = a.checkoutSession(m[1]);
        return sendHtml(res, 200, checkoutPage(s, store));
      }
      if ((m = /^\/checkout\/([^/]+)\/pay$/.exec(url.pathname)) && method === "POST") {
        const s = a.completeCheckout(m[1]);
        await drained();
        return redirect(res, s.success_url!.replace("{CHECKOUT_SESSION_ID}", s.id));
      }
      if ((m = /^\/portal\/([^/]+)$/.exec(url.pathname)) && method === "GET") {
        const s = store.portalSessions.get(m[1]);
        if (!s) return sendHtml(res, 404, "<p>This portal link is unknown or expired.</p>");
        return sendHtml(res, 200, portalPage(s, store));
      }
      if ((m = /^\/portal\/([^/]+)\/(payment|cancel)$/.exec(url.pathname)) && method === "POST") {
        const s = store.portalSessions.get(m[1]);
        if (!s) return sendHtml(res, 404, "<p>This portal link is unknown or expired.</p>");
        const customer = s.customer as string;
        if (m[2] === "payment") a.fixPayment(customer);
        else {
          const sub = [...store.subscriptions.values()].find((x) => x.customer === customer && x.status !== "canceled");
          if (sub) a.cancelSubscription(sub.id);
        }
        await drained();
        return redirect(res, `/portal/${s.id}`);
      }
      if ((m = /^\/invoice\/([^/]+)$/.exec(url.pathname)) && method === "GET") {
        return sendHtml(res, 200, invoicePage(a.invoice(m[1]), store));
      }
    } catch (err) {
      if (err instanceof FakeError) return sendHtml(res, err.status, `<p>${err.message.replace(/</g, "&lt;")}</p>`);
      throw err;
    }
    void body;
    return sendHtml(res, 404, "<p>Not found.</p>");
  }

  const server = http.createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on("data", (c: Buffer) => chunks.push(c));
    req.on("end", () => {
      const body = Buffer.concat(chunks).toString("utf8");
      const url = new URL(req.url ?? "/", publicUrl);
      if (req.method !== "GET") res.on("finish", scheduleSave);
      const run = async () => {
        if (url.pathname.startsWith("/_fake/")) return handleControl(req, res, url, body);
        if (url.pathname.startsWith("/v1/")) {
          // An outage: the connection drops, as when Stripe is unreachable.
          if (down) return void req.socket.destroy();
          return handleApi(req, res, url, body);
        }
        return handlePages(req, res, url, body);
      };
      run().catch((err) => {
        log(`internal error: ${(err as Error).stack}`);
        if (!res.headersSent) sendError(res, new FakeError(500, "api_error", "The stand-in hit an internal error: " + (err as Error).message));
      });
    });
  });

  return {
    server,
    url: publicUrl,
    listen: () => new Promise<void>((resolve) => server.listen(opts.port, host, resolve)),
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
    store: () => store,
  };
}
