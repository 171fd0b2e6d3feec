# The service and a token (here from the environment; --url and --token work too).
export TRISKEL_URL TRISKEL_TOKEN

# A calculation: the same file as `compute`; waits, prints the finished calculation as JSON.
npm run -s cli -- submit docs/examples/run.json > run.json

# A scan: the file has a "sweep" member; --csv writes its results table.
npm run -s cli -- submit docs/examples/scan.json --csv scan.csv > scan.json

# Without waiting: the id now, the state later, the result file when it is done.
ID=$(npm run -s cli -- submit docs/examples/run.json --no-wait)
npm run -s cli -- status "$ID" > status.json
npm run -s cli -- fetch "$ID" > result.json

# The estimate first (compute-seconds and USD), nothing submitted.
npm run -s cli -- submit docs/examples/scan.json --dry-run > estimate.json

# Exit codes for scripts: 0 done, 2 invalid input, 3 refused by plan, quota or spend cap,
# 4 the job failed or was cancelled, 5 token or role, 6 service unreachable.
npm run -s cli -- submit docs/examples/run.json > /dev/null || echo "failed: exit code $?"
