#!/usr/bin/env bash
# Installs what a fresh clone lacks: npm packages (from the lockfile) and, with --browser,
# Debian's Chromium for the end-to-end tests. PostgreSQL is installed by scripts/db.sh.
set -euo pipefail
cd "$(dirname "$0")/.."

# npm ci when node_modules is missing or older than the lockfile.
if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
	echo "setup: installing npm packages (npm ci)..."
	npm ci --no-audit --no-fund --loglevel=error
fi

# tsconfig's $lib paths (used by the TypeScript scripts run with tsx) come from SvelteKit's
# generated .svelte-kit/tsconfig.json.
[ -f .svelte-kit/tsconfig.json ] || npx svelte-kit sync

if [ "${1:-}" = --browser ] && [ ! -x /usr/bin/chromium ]; then
	echo "setup: installing Debian's chromium for the browser tests (apt-get)..."
	if [ "$(id -u)" != 0 ]; then
		echo "setup: run as root, or install the 'chromium' package yourself." >&2
		exit 1
	fi
	export DEBIAN_FRONTEND=noninteractive
	apt-get update -qq
	apt-get install -y -qq chromium >/dev/null
fi
