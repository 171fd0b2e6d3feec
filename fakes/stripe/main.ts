// Starts the Stripe stand-in (development and tests only) on 127.0.0.1:$STRIPE_FAKE_PORT,
// delivering signed webhooks to $STRIPE_FAKE_WEBHOOK_URL with $STRIPE_WEBHOOK_SECRET.
import { createFakeStripe } from "./server";

const port = Number(process.env.STRIPE_FAKE_PORT);
if (!Number.isInteger(port) || port <= 0) {
  console.error("fake stripe: STRIPE_FAKE_PORT must be a port number");
  process.exit(78);
}
const webhookSecret = process.env.STRIPE_WEBHOOK_SECRET;
if (!webhookSecret) {
  console.error("fake stripe: STRIPE_WEBHOOK_SECRET is missing");
  process.exit(78);
}
const fake = createFakeStripe({
  port,
  webhookUrl: process.env.STRIPE_FAKE_WEBHOOK_URL || undefined,
  webhookSecret,
  secretKey: process.env.STRIPE_SECRET_KEY || undefined,
  stateFile: process.env.STRIPE_FAKE_STATE_FILE || undefined,
  log: (line) => console.log(`[fake-stripe] ${line}`),
});
await fake.listen();
console.log(`[fake-stripe] listening on ${fake.url}; webhooks to ${process.env.STRIPE_FAKE_WEBHOOK_URL ?? "(none)"}`);
const stop = () => void fake.close().then(() => process.exit(0));
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
