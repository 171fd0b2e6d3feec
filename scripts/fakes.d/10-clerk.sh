# The local stand-in for Clerk (fakes/clerk/, development and tests only).
start_fake_clerk() {
  if [ "${CLERK_USE_STAND_IN:-1}" != 1 ]; then
    log "Clerk: using the hosted service (no local stand-in)"
    return 0
  fi
  start_service clerk node_modules/.bin/tsx fakes/clerk/server.ts
  wait_http "http://127.0.0.1:$CLERK_FAKE_PORT/__fake/health" clerk
  log "Clerk stand-in on 127.0.0.1:$CLERK_FAKE_PORT (browser: $NEXT_PUBLIC_CLERK_PROXY_URL)"
}
