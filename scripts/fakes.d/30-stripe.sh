# The local stand-in for Stripe (fakes/stripe/, development and tests only), then the Stripe
# objects Triskel needs (products, prices, billing meter), created idempotently.
start_fake_stripe() {
  if [ "${STRIPE_API_HOST:-}" != 127.0.0.1 ] || [ "${STRIPE_API_PORT:-}" != "$STRIPE_FAKE_PORT" ]; then
    log "Stripe: using ${STRIPE_API_PROTOCOL:-https}://${STRIPE_API_HOST:-api.stripe.com}:${STRIPE_API_PORT:-443} (no local stand-in)"
  else
    # A developer's instance keeps the stand-in's customers and subscriptions across restarts
    # (its database does too); test instances start empty, like their database.
    if [[ "${TRISKEL_INSTANCE:-}" != test-* ]]; then export STRIPE_FAKE_STATE_FILE="$DATA_DIR/stripe-stand-in.json"; fi
    start_service stripe node_modules/.bin/tsx fakes/stripe/main.ts
    wait_http "http://127.0.0.1:$STRIPE_FAKE_PORT/_fake/health" stripe
    log "Stripe stand-in on 127.0.0.1:$STRIPE_FAKE_PORT"
  fi
  tsx scripts/stripe-setup.ts
}
