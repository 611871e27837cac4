#!/usr/bin/env bash
# Starts or stops the local services on 127.0.0.1: PostgreSQL and Redis from
# Debian's packages, and the S3 and SMTP fakes in fakes/. Each start is
# idempotent; stop ends only what a start here began (pid files in .data/run).
#   scripts/services.sh start|stop|status
. "$(dirname "$0")/lib/common.sh"
load_env

# --- PostgreSQL -------------------------------------------------------------
# PostgreSQL refuses to run as root, so as root it runs as the postgres user.
# That user must be able to traverse every parent of its data folder. A clone
# under /root (mode 700), as CI makes, is not traversable: then the cluster
# lives in /var/lib/crownlight/<hash of this checkout>/ and .data/pg-location
# says where. We never loosen the permissions of folders that are not ours.
pg_base() {
  if ! is_root; then printf '%s' "$DATA/postgres"; return; fi
  if runuser -u postgres -- test -x "$DATA" 2>/dev/null; then
    printf '%s' "$DATA/postgres"
  else
    local hash
    hash="$(printf '%s' "$ROOT" | sha1sum | cut -c1-12)"
    printf '%s' "/var/lib/crownlight/$hash"
  fi
}

as_pg() { if is_root; then runuser -u postgres -- "$@"; else "$@"; fi; }

pg_start() {
  local base bin
  base="$(pg_base)"; bin="$(pg_bin)"
  printf '%s\n' "$base" >"$DATA/pg-location"
  local pgdata="$base/data" sock="$base/socket"
  mkdir -p "$base" "$sock"
  if is_root; then chown postgres:postgres "$base" "$sock"; chmod 700 "$base"; fi
  if [ ! -f "$pgdata/PG_VERSION" ]; then
    say "initialising PostgreSQL cluster in $pgdata"
    as_pg "$bin/initdb" -D "$pgdata" --auth=trust -E UTF8 --locale=C.UTF-8 -U crownlight >"$LOGS/initdb.log" 2>&1 \
      || die "initdb failed; see $LOGS/initdb.log"
  fi
  if as_pg "$bin/pg_ctl" -D "$pgdata" status >/dev/null 2>&1; then
    say "PostgreSQL already running on 127.0.0.1:$PG_PORT"
  else
    port_busy "$PG_PORT" && die "port $PG_PORT is taken by another program; set PG_PORT in .env"
    local logf="$base/postgres.log"
    as_pg "$bin/pg_ctl" -D "$pgdata" -l "$logf" -w -t 60 \
      -o "-c listen_addresses=127.0.0.1 -p $PG_PORT -k $sock" start >/dev/null \
      || die "PostgreSQL did not start; see $logf"
    printf '%s\n' "$pgdata" >"$RUN/postgres.started"
    say "PostgreSQL started on 127.0.0.1:$PG_PORT (data in $pgdata)"
  fi
  local db
  for db in crownlight crownlight_test; do
    if ! "$bin/psql" -h 127.0.0.1 -p "$PG_PORT" -U crownlight -d postgres -tAc "select 1 from pg_database where datname='$db'" | grep -q 1; then
      "$bin/createdb" -h 127.0.0.1 -p "$PG_PORT" -U crownlight "$db"
      say "created database $db"
    fi
  done
}

pg_stop() {
  [ -f "$RUN/postgres.started" ] || return 0
  local pgdata bin
  pgdata="$(cat "$RUN/postgres.started")"; bin="$(pg_bin)"
  as_pg "$bin/pg_ctl" -D "$pgdata" -m fast -w stop >/dev/null 2>&1 || true
  rm -f "$RUN/postgres.started"
  say "PostgreSQL stopped"
}

# --- Redis ------------------------------------------------------------------
redis_start() {
  if pid_alive "$RUN/redis.pid"; then say "Redis already running on 127.0.0.1:$REDIS_PORT"; return; fi
  port_busy "$REDIS_PORT" && die "port $REDIS_PORT is taken by another program; set REDIS_PORT in .env"
  mkdir -p "$DATA/redis"
  redis-server --bind 127.0.0.1 --port "$REDIS_PORT" --protected-mode yes \
    --dir "$DATA/redis" --appendonly yes --maxmemory-policy noeviction \
    --daemonize yes --pidfile "$RUN/redis.pid" --logfile "$LOGS/redis.log" \
    || die "Redis did not start; see $LOGS/redis.log"
  wait_port "$REDIS_PORT" Redis
  say "Redis started on 127.0.0.1:$REDIS_PORT"
}

# --- Node processes (fakes) ---------------------------------------------------
node_start() {
  local name="$1" port="$2" entry="$3"
  if pid_alive "$RUN/$name.pid"; then say "$name already running on 127.0.0.1:$port"; return; fi
  port_busy "$port" && die "port $port is taken by another program (wanted by $name)"
  spawn "$name" node --import tsx "$entry"
  wait_port "$port" "$name" 200
  say "$name started on 127.0.0.1:$port"
}


s3_port() { local u="${S3_ENDPOINT#*://}"; u="${u##*:}"; printf '%s' "${u%%/*}"; }
smtp_port() { local u="${SMTP_URL##*:}"; printf '%s' "${u%%/*}"; }

case "${1:-start}" in
  start)
    pg_start
    redis_start
    node_start s3-fake "$(s3_port)" fakes/s3/server.ts
    node_start smtp-fake "$(smtp_port)" fakes/smtp/server.ts
    ;;
  stop)
    stop_group smtp-fake
    stop_group s3-fake
    stop_group redis
    pg_stop
    ;;
  status)
    for n in redis s3-fake smtp-fake; do
      if pid_alive "$RUN/$n.pid"; then echo "$n: running (pid $(head -n1 "$RUN/$n.pid"))"; else echo "$n: stopped"; fi
    done
    if [ -f "$RUN/postgres.started" ]; then echo "postgres: started here ($(cat "$RUN/postgres.started"))"; else echo "postgres: not started here"; fi
    ;;
  *) die "usage: scripts/services.sh start|stop|status" ;;
esac
