#!/usr/bin/env bash
# Ends everything the start and test scripts began, by their pid files: the app
# and its worker, every test lane's web app and worker (test-web_lane3, ...),
# then the services.
. "$(dirname "$0")/lib/common.sh"
. "$(dirname "$0")/lib/app.sh"
for f in "$RUN"/*.pid; do
  [ -e "$f" ] || continue
  name="$(basename "$f" .pid)"
  case "$name" in
    web | worker | test-web | test-worker | test-web_lane* | test-worker_lane*) stop_named "$name" ;;
  esac
done
bash "$ROOT/scripts/services.sh" stop
