#!/usr/bin/env bash
# npm test: the whole set-up on separate databases, then every test runner; ends with one line
# "N passed, N failed" that totals them.
set -uo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-deps.sh --browser || exit 1

was_running=0
bash scripts/db.sh status >/dev/null 2>&1 && was_running=1
bash scripts/db.sh start || exit 1
[ "$was_running" = 1 ] || trap 'bash scripts/db.sh stop' EXIT

reports=$(mktemp -d)
status=0

echo "== type check (svelte-check)"
npm run --silent check || status=1

echo "== unit and integration tests (vitest)"
npx vitest run --reporter=default --reporter=json --outputFile.json="$reports/vitest.json" || status=1

echo "== build"
npm run --silent build || status=1

echo "== end-to-end tests (playwright, Debian chromium)"
PLAYWRIGHT_JSON_OUTPUT_NAME="$reports/playwright.json" npx playwright test --reporter=list,json || status=1

# Crash and restart, against the built app and this cluster (check:db-outage stops and starts it,
# so it runs last, when nothing else uses it). Each counts as one test in the summary.
echo "== crash and restart checks"
: >"$reports/checks.txt"
for check in check:restart check:crash check:db-outage; do
	if npm run --silent "$check"; then echo "pass $check" >>"$reports/checks.txt"; else echo "fail $check" >>"$reports/checks.txt"; status=1; fi
done

node scripts/test-summary.js "$reports/vitest.json" "$reports/playwright.json" "$reports/checks.txt"
[ $? = 0 ] || status=1
exit $status
