// Minimal hosted pages of the stand-in: Checkout (a pay button that returns to success_url), the
// customer portal (payment details, plan cancellation, invoices) and an invoice view. Plain HTML,
// clearly marked as a local stand-in: no card is ever asked for.
import type { FakeCheckoutSession, FakeInvoice, FakePortalSession, Store } from "./store";

const esc = (s: unknown) => String(s ?? "").replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
const money = (cents: number, currency = "usd") => `${(cents / 100).toFixed(2)} ${currency.toUpperCase()}`;
const day = (s: number) => new Date(s * 1000).toISOString().slice(0, 10);

function layout(title: string, body: string): string {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${esc(title)}</title>
<meta name="viewport" content="width=device-width, initial-scale=1">
<style>
body{font-family:system-ui,sans-serif;background:#f3f1ea;color:#1b2730;margin:0}
main{max-width:34rem;margin:3rem auto;background:#fff;border:1px solid #d8d3c6;border-radius:12px;padding:1.5rem 2rem}
.note{font-size:.8rem;color:#5d6a72;border-bottom:1px dashed #c9c2b2;padding-bottom:.5rem;margin-bottom:1rem}
table{width:100%;border-collapse:collapse}td,th{padding:.35rem 0;text-align:left;border-bottom:1px solid #eee}td.n{text-align:right}
button{font:inherit;padding:.6rem 1.2rem;border-radius:8px;border:0;background:#1d6e62;color:#fff;cursor:pointer}
button.quiet{background:#e7e3d8;color:#1b2730}a{color:#1d6e62}
</style></head><body><main><p class="note">Local payment stand-in — development and tests only. No card is charged.</p>${body}</main></body></html>`;
}

export function checkoutPage(s: FakeCheckoutSession, store: Store): string {
  let monthly = 0;
  const rows = s.line_items_input
    .map((li) => {
      const price = store.prices.get(li.price)!;
      const product = store.products.get(price.product as string);
      if (price.recurring?.usage_type === "metered") {
        return `<tr><td>${esc(product?.name)}</td><td class="n">metered: ${esc(price.unit_amount_decimal)} ¢ per unit</td></tr>`;
      }
      const amount = (li.quantity ?? 1) * (price.unit_amount ?? 0);
      monthly += amount;
      return `<tr><td>${esc(product?.name)} × ${li.quantity}</td><td class="n">${money(amount, price.currency)} / month</td></tr>`;
    })
    .join("");
  const closed = s.status !== "open" ? `<p>This checkout is ${esc(s.status)}.</p>` : "";
  return layout(
    "Checkout",
    `<h1>Subscribe</h1>${closed}<table>${rows}` +
      `<tr><th>Due today</th><th class="n" data-testid="checkout-total">${money(monthly, s.currency ?? "usd")}</th></tr></table>
<form method="post" action="/checkout/${esc(s.id)}/pay" style="margin-top:1.2rem">` +
      `<button type="submit" ${s.status !== "open" ? "disabled" : ""}>Pay and subscribe</button></form>
${s.cancel_url ? `<p><a href="${esc(s.cancel_url)}">Back without subscribing</a></p>` : ""}`,
  );
}

export function portalPage(s: FakePortalSession, store: Store): string {
  const customer = s.customer as string;
  const subs = [...store.subscriptions.values()].filter((x) => x.customer === customer);
  const active = subs.find((x) => x.status !== "canceled");
  const invoices = [...store.invoices.values()].filter((i) => i.customer === customer).sort((a, b) => b.created - a.created);
  const items = active
    ? active.items.data
        .map(
          (it) =>
            `<tr><td>${esc(store.products.get(it.price.product as string)?.name)}</td><td class="n">${it.quantity ?? "metered"}</td>` +
            `<td class="n">until ${day(it.current_period_end)}</td></tr>`,
        )
        .join("")
    : "";
  const failing = store.failingCustomers.has(customer);
  return layout(
    "Billing portal",
    `<h1>Your subscription</h1>
<p data-testid="portal-status">${active ? `Status: ${esc(active.status)}` : "No active subscription."}</p>
${active ? `<table><tr><th>Item</th><th class="n">Quantity</th><th class="n">Period</th></tr>${items}</table>` : ""}
<h2>Payment details</h2><p>${failing ? "The card on file is being declined." : "Test card on file."}</p>
<form method="post" action="/portal/${esc(s.id)}/payment"><button type="submit" class="quiet">Update payment details</button></form>
${
  active
    ? `<form method="post" action="/portal/${esc(s.id)}/cancel" style="margin-top:.6rem">` +
      `<button type="submit" class="quiet">Cancel subscription</button></form>`
    : ""
}
<h2>Invoices</h2>${
      invoices.length
        ? `<table>${invoices
            .map(
              (i) =>
                `<tr><td><a href="/invoice/${esc(i.id)}">${esc(i.number)}</a></td><td>${day(i.created)}</td>` +
                `<td>${esc(i.status)}</td><td class="n">${money(i.total, i.currency)}</td></tr>`,
            )
            .join("")}</table>`
        : "<p>No invoices yet.</p>"
    }
${s.return_url ? `<p style="margin-top:1.2rem"><a href="${esc(s.return_url)}" data-testid="portal-return">Return to the app</a></p>` : ""}`,
  );
}

export function invoicePage(i: FakeInvoice, store: Store): string {
  void store;
  const rows = i.lines.data.map((l) => `<tr><td>${esc(l.description)}</td><td class="n">${money(l.amount, l.currency)}</td></tr>`).join("");
  return layout(
    `Invoice ${i.number ?? ""}`,
    `<h1>Invoice ${esc(i.number)}</h1><p>${day(i.period_start)} – ${day(i.period_end)} · ${esc(i.status)}</p>` +
      `<table>${rows}<tr><th>Total</th><th class="n">${money(i.total, i.currency)}</th></tr></table>`,
  );
}
