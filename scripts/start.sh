#!/usr/bin/env bash
# npm start: from a fresh clone to the running app with the demo farm loaded.
set -euo pipefail
cd "$(dirname "$0")/.."

bash scripts/ensure-deps.sh
bash scripts/db.sh start
export DATABASE_URL=${DATABASE_URL:-$(bash scripts/db.sh url patchbook)}
node scripts/migrate.js
npx tsx scripts/load-demo.ts

# Build when there is no build or any source is newer than it.
if [ ! -f build/index.js ] || [ -n "$(find src static svelte.config.js vite.config.ts package-lock.json -newer build/index.js -print -quit)" ]; then
	echo "start: building the app..."
	npm run --silent build
fi

export HOST=${HOST:-127.0.0.1} PORT=${PORT:-3000}
export ORIGIN=${ORIGIN:-http://$HOST:$PORT}
export BODY_SIZE_LIMIT=${BODY_SIZE_LIMIT:-Infinity}

# Without a real mail server, mail goes to the local fake and the app's development outbox.
# It stops by itself when the app (this shell, exec'd below) is gone.
if [ -z "${SMTP_URL:-}" ]; then
	smtp_port=${PATCHBOOK_SMTP_PORT:-2525}
	PATCHBOOK_SMTP_PORT=$smtp_port node --import tsx scripts/fake-smtp.ts &
	export SMTP_URL=smtp://127.0.0.1:$smtp_port PATCHBOOK_DEV_OUTBOX=on
fi
cat <<MSG

Patchbook is running at $ORIGIN
Demo sign-ins (password for all: patchbook-demo):
  manager     mara@tallowgrass.example
  agronomist  dev@fieldwise-agronomy.example   (also agronomist of Brennan Creek Farm)
  operators   sam@tallowgrass.example, noor@tallowgrass.example
  landlords   helen.marsh@landowner.example (North Flat, Schoolhouse)
              arvid.lund@landowner.example (Long Hill)
  manager of the second farm: tom@brennancreek.example
Mail goes to $SMTP_URL${PATCHBOOK_DEV_OUTBOX:+; managers read it under Team > Development outbox}.
Stop with Ctrl-C; the database keeps running until 'npm run db:stop'.

MSG
exec node build
