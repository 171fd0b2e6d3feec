# Request rate limits per API token and per signed-in member (src/server/http/rate-limit.ts;
# defaults in src/env.ts: 600 reads and 120 writes per minute). Test and soak instances get budgets no test
# reaches by accident (tests/integration/rate-limit.test.ts fills one token's budget on purpose).
case "$TRISKEL_INSTANCE" in
  test-* | soak-*)
    export RATE_LIMIT_READS_PER_MINUTE="${RATE_LIMIT_READS_PER_MINUTE:-1000000}"
    export RATE_LIMIT_WRITES_PER_MINUTE="${RATE_LIMIT_WRITES_PER_MINUTE:-1000000}"
    ;;
esac
