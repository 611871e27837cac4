#!/usr/bin/env bash
# The one command that sets everything up and serves the app:
# installs what is missing, starts PostgreSQL, Redis and the fakes, migrates,
# seeds the demo scenario, builds (when sources changed) and serves the app at
# http://127.0.0.1:3000 with its worker. Ctrl-C stops all of it.
. "$(dirname "$0")/lib/common.sh"
. "$(dirname "$0")/lib/app.sh"

bash "$ROOT/scripts/setup.sh"
load_env
bash "$ROOT/scripts/services.sh" start

(cd "$ROOT" && node --import tsx db/migrate.ts) || die "migration failed"
(cd "$ROOT" && node --import tsx db/seed/index.ts) || die "seeding failed"

build_app .next

cleanup() {
  trap - INT TERM EXIT
  say "stopping"
  bash "$ROOT/scripts/stop.sh"
  exit 0
}
trap cleanup INT TERM EXIT

start_worker worker
start_app web "$APP_PORT" .next

cat >&2 <<INFO

  Crownlight is up.
    app          $APP_URL
    mailbox      http://127.0.0.1:$MAILBOX_PORT/   (every e-mail the app sends)
    PostgreSQL   127.0.0.1:$PG_PORT   Redis 127.0.0.1:$REDIS_PORT   S3 fake $S3_ENDPOINT   SMTP fake $SMTP_URL
    logs         .data/logs/
  Press Ctrl-C to stop everything (or run: npm run stop).

INFO

# Stay in the foreground while both processes live; if either dies, stop all.
while pid_alive "$RUN/web.pid" && pid_alive "$RUN/worker.pid"; do sleep 1; done
say "the web app or the worker exited; see .data/logs/"
