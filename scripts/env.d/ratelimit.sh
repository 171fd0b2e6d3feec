# Request rate limits per member and, for requests without working credentials, per client address
# (src/server/http/rate-limit.ts; defaults in src/env.ts: 600 reads, 120 writes and 60 failed requests per
# minute). Test instances get budgets no test reaches by accident (tests/integration/rate-limit.test.ts
# and rate-limits.test.ts fill budgets on purpose, in Redis); the soak instance (npm run test:soak) keeps
# the production defaults: its load test spreads over several members, as real clients would, and
# counts the 429s.
case "$TRISKEL_INSTANCE" in
  test-*)
    export RATE_LIMIT_READS_PER_MINUTE="${RATE_LIMIT_READS_PER_MINUTE:-1000000}"
    export RATE_LIMIT_WRITES_PER_MINUTE="${RATE_LIMIT_WRITES_PER_MINUTE:-1000000}"
    export RATE_LIMIT_FAILED_PER_MINUTE="${RATE_LIMIT_FAILED_PER_MINUTE:-1000000}"
    ;;
esac
# Tests stand in for a trusting reverse proxy: they name the client in X-Forwarded-For (one hop), so
# tests/integration/rate-limits.test.ts can be several clients; requests without it are the socket address.
case "$TRISKEL_INSTANCE" in
  test-*) export TRUSTED_PROXY_HOPS="${TRUSTED_PROXY_HOPS:-1}" ;;
esac
