# Payments: the app talks to Stripe through the official SDK. Locally (start and test scripts) it
# points at the stand-in in fakes/stripe/ on STRIPE_FAKE_PORT; for real Stripe set these four
# variables yourself (docs/billing.md) and the stand-in is not used. A key of your own gets none
# of the stand-in's defaults: not its host, and never its development webhook secret (src/env.ts
# refuses that secret with a live key or against api.stripe.com in production mode).
if [ -z "${STRIPE_SECRET_KEY:-}" ] || [ "$STRIPE_SECRET_KEY" = sk_test_triskel_local_stand_in ]; then
  export STRIPE_SECRET_KEY=sk_test_triskel_local_stand_in
  export STRIPE_API_HOST="${STRIPE_API_HOST:-127.0.0.1}"
  export STRIPE_API_PORT="${STRIPE_API_PORT:-$STRIPE_FAKE_PORT}"
  export STRIPE_API_PROTOCOL="${STRIPE_API_PROTOCOL:-http}"
  export STRIPE_WEBHOOK_SECRET="${STRIPE_WEBHOOK_SECRET:-whsec_triskel_local_stand_in_secret}"
fi
# Where the stand-in delivers webhooks (the app's endpoint).
export STRIPE_FAKE_WEBHOOK_URL="${STRIPE_FAKE_WEBHOOK_URL:-$APP_URL/api/webhooks/stripe}"
