#!/usr/bin/env bash
# The one command that sets everything up and serves the app:
# installs what is missing, starts PostgreSQL, Redis and the fakes, migrates,
# starts the worker, seeds the demo scenario (people, and three demo brackets
# uploaded, ingested and sent to reduction), builds (when sources changed) and
# serves the app at http://127.0.0.1:3000. Ctrl-C stops all of it.
. "$(dirname "$0")/lib/common.sh"
. "$(dirname "$0")/lib/app.sh"

bash "$ROOT/scripts/setup.sh"
load_env
bash "$ROOT/scripts/services.sh" start

(cd "$ROOT" && node --import tsx db/migrate.ts) || die "migration failed"

# Ctrl-C ends with 0; a step that fails (die) keeps its failing status.
cleanup() {
  local rc="${1:-0}"
  trap - INT TERM EXIT
  say "stopping"
  bash "$ROOT/scripts/stop.sh"
  exit "$rc"
}
trap 'cleanup 0' INT TERM
trap 'cleanup $?' EXIT

# The worker starts before the seed: the demo brackets are ingested by it, and
# their reductions run while the web app builds. SEED_DEMO_BRACKETS=0 skips them.
start_worker worker
say "seeding the demo scenario (the first start renders, uploads and ingests three synthetic brackets: about a minute)"
(cd "$ROOT" && SEED_DEMO_BRACKETS="${SEED_DEMO_BRACKETS:-1}" node --import tsx db/seed/index.ts) || die "seeding failed"

build_app .next
start_app web "$APP_PORT" .next

# The demo reductions ran while the app built; publish them as the gallery's first plates.
if [ "${SEED_DEMO_BRACKETS:-1}" = 1 ]; then
  say "publishing the demo reductions as plates (waits for them to finish)"
  (cd "$ROOT" && node --import tsx db/seed/publish-demo.ts) || say "publishing the demo plates failed; the app runs without them (see above)"
fi

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
