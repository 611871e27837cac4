#!/usr/bin/env bash
# Ends exactly what the start and test scripts began, by their pid files.
. "$(dirname "$0")/lib/common.sh"
. "$(dirname "$0")/lib/app.sh"
for name in web worker test-web test-worker; do stop_named "$name"; done
bash "$ROOT/scripts/services.sh" stop
