# Sign-in: the app talks to Clerk through @clerk/nextjs. Locally (start and test scripts) every
# Clerk variable points at the stand-in in fakes/clerk/ (development and tests only), reached by
# the browser same-origin through the Next rewrite /__clerk/* and by the server on CLERK_FAKE_PORT.
# For real Clerk, export CLERK_SECRET_KEY, NEXT_PUBLIC_CLERK_PUBLISHABLE_KEY and
# CLERK_WEBHOOK_SECRET yourself and set CLERK_USE_STAND_IN=0 (docs/accounts.md).
export CLERK_USE_STAND_IN="${CLERK_USE_STAND_IN:-1}"
if [ "$CLERK_USE_STAND_IN" = 1 ]; then
  # pk_live_ + base64("clerk.triskel.local$"): a production-type key (no development-browser cookie).
  export NEXT_PUBLIC_CLERK_PUBLISHABLE_KEY="pk_live_Y2xlcmsudHJpc2tlbC5sb2NhbCQ"
  export CLERK_SECRET_KEY="sk_live_triskel_local_stand_in"
  export CLERK_API_URL="http://127.0.0.1:$CLERK_FAKE_PORT"
  export CLERK_FAKE_URL="http://127.0.0.1:$CLERK_FAKE_PORT"
  export NEXT_PUBLIC_CLERK_PROXY_URL="$APP_URL/__clerk"
  export CLERK_WEBHOOK_SECRET="${CLERK_WEBHOOK_SECRET:-whsec_dHJpc2tlbC1sb2NhbC1jbGVyay1zdGFuZC1pbg}"
  export CLERK_WEBHOOK_URL="$APP_URL/api/webhooks/clerk"
  export CLERK_FAKE_STATE_FILE="$RUN_DIR/clerk-fake-state.json"
  export CLERK_FAKE_KEY_FILE="$RUN_DIR/clerk-fake-key.pem"
fi
# clerk-js is served by the app itself (copied into public/clerk/ by scripts/clerk-js.sh).
export NEXT_PUBLIC_CLERK_JS_URL="${NEXT_PUBLIC_CLERK_JS_URL:-/clerk/clerk.browser.js}"
export NEXT_PUBLIC_CLERK_PREFETCH_UI=false
export NEXT_PUBLIC_CLERK_TELEMETRY_DISABLED=1
export NEXT_PUBLIC_CLERK_KEYLESS_DISABLED=1
export NEXT_PUBLIC_CLERK_SIGN_IN_URL="${NEXT_PUBLIC_CLERK_SIGN_IN_URL:-/sign-in}"
export NEXT_PUBLIC_CLERK_SIGN_UP_URL="${NEXT_PUBLIC_CLERK_SIGN_UP_URL:-/sign-up}"
# Copy clerk-js into public/ before any build (cheap: skipped when already up to date).
bash "$ROOT/scripts/clerk-js.sh"
