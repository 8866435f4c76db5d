#!/usr/bin/env bash
# The production build on a fresh, seeded database, with mail captured to files the tests read.
set -euo pipefail
mkdir -p tests/.tmp
rm -rf tests/.tmp/e2e.db* tests/.tmp/e2e-mail
export NODE_ENV=production DATABASE_URL=file:tests/.tmp/e2e.db MAIL_CAPTURE=1 MAIL_DIR=tests/.tmp/e2e-mail
export SESSION_SECRET=e2e-only-secret-0123456789abcdef0123456789 LOG_LEVEL=warn
npx tsx server/seed.ts >/dev/null
exec npx tsx server/index.ts
