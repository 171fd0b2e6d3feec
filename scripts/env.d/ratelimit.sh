# Request rate limits per API token and per signed-in member (src/server/http/rate-limit.ts;
# defaults in src/env.ts: 600 reads and 120 writes per minute). Test instances get budgets no test
# reaches by accident (tests/integration/rate-limit.test.ts fills one token's budget on purpose);
# the soak instance (npm run test:soak) keeps the production defaults: its load test spreads over
# several members, as real clients would, and counts the 429s.
case "$TRISKEL_INSTANCE" in
  test-*)
    export RATE_LIMIT_READS_PER_MINUTE="${RATE_LIMIT_READS_PER_MINUTE:-1000000}"
    export RATE_LIMIT_WRITES_PER_MINUTE="${RATE_LIMIT_WRITES_PER_MINUTE:-1000000}"
    ;;
esac
