# Building and running the web app and the worker. Sourced after common.sh.

# A hash of everything the build reads, so a second start skips an unchanged build.
source_hash() {
  if git -C "$ROOT" rev-parse >/dev/null 2>&1; then
    (cd "$ROOT" && git ls-files -co --exclude-standard -- app components lib db public instrumentation.ts next.config.mjs \
      postcss.config.mjs tsconfig.json package-lock.json | sort | xargs -r sha1sum 2>/dev/null | sha1sum | cut -c1-40)
  else
    date +%s
  fi
}

# build_app DISTDIR: next build into DISTDIR unless the sources are unchanged.
build_app() {
  local dist="$1" stamp="$ROOT/$1/.crownlight-source" hash
  hash="$(source_hash)"
  if [ -f "$stamp" ] && [ "$(cat "$stamp")" = "$hash" ] && [ -f "$ROOT/$dist/BUILD_ID" ]; then
    say "web app build is up to date ($dist)"
    return
  fi
  say "building the web app into $dist (about a minute the first time)"
  (cd "$ROOT" && NEXT_DIST_DIR="$dist" NEXT_TELEMETRY_DISABLED=1 node node_modules/next/dist/bin/next build >"$LOGS/build.log" 2>&1) \
    || { tail -n 40 "$LOGS/build.log" >&2; die "next build failed; see $LOGS/build.log"; }
  printf '%s' "$hash" >"$stamp"
}

# start_app NAME PORT DISTDIR: the Next.js server itself (not a wrapper), pid in .data/run.
start_app() {
  local name="$1" port="$2" dist="$3"
  if pid_alive "$RUN/$name.pid"; then say "$name already running on 127.0.0.1:$port"; return; fi
  port_busy "$port" && die "port $port is taken by another program (wanted by $name)"
  NEXT_DIST_DIR="$dist" spawn "$name" node node_modules/next/dist/bin/next start -H 127.0.0.1 -p "$port"
  wait_port "$port" "$name" 300
  say "$name serving http://127.0.0.1:$port"
}

start_worker() {
  local name="$1"
  if pid_alive "$RUN/$name.pid"; then say "$name already running"; return; fi
  spawn "$name" bash scripts/with-malloc-tuning.sh node --import tsx worker/index.ts
  sleep 0.5
  pid_alive "$RUN/$name.pid" || { tail -n 20 "$LOGS/$name.log" >&2; die "$name did not start; see $LOGS/$name.log"; }
  say "$name started"
}

stop_named() { stop_group "$1"; }
