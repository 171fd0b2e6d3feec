// Billing work of the worker process: the meter-event sender (outbox -> Stripe), spend-cap
// e-mails, and the end of grace periods. `startBillingLoop()` is called from worker/main.ts.
// Run alone (`tsx worker/billing.ts`) it is one more sender, as many as you like can run at once.
import { pathToFileURL } from "node:url";
import { env, loadEnvOrExit } from "../src/env";
import { sendDueMeterEvents } from "../src/server/billing/meter-sender";
import { sendSpendCapNotices } from "../src/server/billing/notify";
import { billingConfigured } from "../src/server/billing/stripe";
import { reconcileSeats } from "../src/server/billing/subscriptions";
import { expireGracePeriods } from "../src/server/billing/webhooks";

export function startBillingLoop(options: { intervalMs?: number; workspaceId?: string } = {}): () => void {
  const intervalMs = options.intervalMs ?? env().METER_SENDER_INTERVAL_MS;
  let stopped = false;
  let timer: NodeJS.Timeout | undefined;
  const lastErrors = new Map<string, string>();
  /** One step of the pass; a failing step is logged (once per distinct message) and does not stop the others. */
  const step = async (name: string, fn: () => Promise<unknown>) => {
    try {
      await fn();
      lastErrors.delete(name);
    } catch (err) {
      const line = (err as Error).message.split("\n")[0];
      if (lastErrors.get(name) !== line) console.error(`[billing] ${name} failed (will retry): ${line}`);
      lastErrors.set(name, line);
    }
  };
  const tick = async () => {
    try {
      if (billingConfigured()) {
        await step("meter sender", async () => {
          const r = await sendDueMeterEvents({ workspaceId: options.workspaceId });
          if (r.sent || r.failed || r.retrying)
            console.log(`[billing] meter events: ${r.sent} sent, ${r.alreadyRecorded} already recorded, ${r.retrying} retrying, ${r.failed} failed`);
        });
      }
      if (!options.workspaceId) {
        await step("grace periods", () => expireGracePeriods());
        await step("spend-cap e-mails", () => sendSpendCapNotices());
        // Seat count follows membership (members invited or removed since the last pass).
        if (billingConfigured()) await step("seats", () => reconcileSeats());
      }
    } finally {
      if (!stopped) {
        timer = setTimeout(() => void tick(), intervalMs);
        timer.unref();
      }
    }
  };
  timer = setTimeout(() => void tick(), 200);
  timer.unref();
  return () => {
    stopped = true;
    if (timer) clearTimeout(timer);
  };
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const workspaceId = loadEnvOrExit().METER_SENDER_WORKSPACE_ID;
  console.log(`[billing] standalone sender pid ${process.pid}${workspaceId ? ` for workspace ${workspaceId}` : ""}`);
  startBillingLoop({ workspaceId });
  setInterval(() => {}, 1 << 30);
}
