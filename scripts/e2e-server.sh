#!/usr/bin/env bash
# The server Playwright starts: a fresh e2e database with the demo farm, then the built app.
set -euo pipefail
cd "$(dirname "$0")/.."
db=${E2E_DB:-patchbook_e2e}
bash scripts/db.sh recreate "$db"
export DATABASE_URL=$(bash scripts/db.sh url "$db")
node scripts/migrate.js
npx tsx scripts/load-demo.ts
npx tsx tests/e2e/seed-e2e.ts
export HOST=127.0.0.1 PORT=${E2E_PORT:-4173} BODY_SIZE_LIMIT=Infinity
export ORIGIN=http://$HOST:$PORT
# The e2e run's own fake mail server: tests read what the app sends from the dev_outbox table.
smtp_port=${E2E_SMTP_PORT:-2526}
PATCHBOOK_SMTP_PORT=$smtp_port node --import tsx scripts/fake-smtp.ts &
export SMTP_URL=smtp://127.0.0.1:$smtp_port PATCHBOOK_DEV_OUTBOX=on
exec node build
