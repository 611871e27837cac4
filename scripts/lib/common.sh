# Shared helpers for the project's scripts. Sourced, not run.
set -euo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
DATA="$ROOT/.data"
RUN="$DATA/run"
LOGS="$DATA/logs"
mkdir -p "$RUN" "$LOGS"

say() { printf '[crownlight] %s\n' "$*" >&2; }
die() { printf '[crownlight] error: %s\n' "$*" >&2; exit 1; }

# Environment: committed defaults, then the developer's own .env, then what the
# caller already exported wins over both.
load_env() {
  local saved
  saved="$(export -p)"
  set -a
  # shellcheck disable=SC1091
  . "$ROOT/.env.example"
  [ -f "$ROOT/.env" ] && . "$ROOT/.env"
  set +a
  # export -p prints "declare -x ..."; inside a function declare makes locals,
  # so restore them as globals.
  eval "${saved//declare -x /declare -gx }"
}

is_root() { [ "$(id -u)" = "0" ]; }

# A pid file names a process we started; it is alive only if the process exists.
pid_alive() {
  local f="$1"
  [ -f "$f" ] || return 1
  local pid
  pid="$(head -n1 "$f" 2>/dev/null || true)"
  [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null
}

# Wait until a TCP port on loopback accepts connections.
wait_port() {
  local port="$1" name="$2" tries="${3:-100}"
  for _ in $(seq 1 "$tries"); do
    if (exec 3<>"/dev/tcp/127.0.0.1/$port") 2>/dev/null; then return 0; fi
    sleep 0.1
  done
  die "$name did not start listening on 127.0.0.1:$port (see $LOGS)"
}

port_busy() { (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null; }

pg_bin() {
  local d
  d="$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n1)"
  [ -n "$d" ] || die "PostgreSQL server binaries not found; run scripts/setup.sh"
  printf '%s' "$d"
}

# spawn NAME COMMAND...: runs COMMAND in the background in a session (and
# process group) of its own, so that stop_group can end it with every child it
# starts (next start runs its server as a child process). The pid file holds
# the group leader's pid.
spawn() {
  local name="$1"; shift
  ( cd "$ROOT"; exec setsid nohup "$@" >"$LOGS/$name.log" 2>&1 </dev/null ) &
  echo $! >"$RUN/$name.pid"
}

# ExifTool processes (exiftool-vendored keeps one perl process per writer, in a
# process group of its own) outlive a web app or worker stopped by a signal, and
# wait on their input for ever. This ends those of this checkout whose parent
# is gone; one whose parent still runs (another lane's test, the app) is left.
reap_orphan_exiftool() {
  local pid
  for pid in $(pgrep -f "$ROOT/node_modules/exiftool-vendored.pl/bin/exiftool" 2>/dev/null); do
    [ "$(awk '/^PPid:/ {print $2}' "/proc/$pid/status" 2>/dev/null)" = 1 ] && kill "$pid" 2>/dev/null || true
  done
}

# stop_group NAME: TERM to the whole group, then KILL after 10 s if needed.
stop_group() {
  local name="$1" f="$RUN/$1.pid"
  if pid_alive "$f"; then
    local pid; pid="$(head -n1 "$f")"
    kill -TERM -- "-$pid" 2>/dev/null || kill -TERM "$pid" 2>/dev/null || true
    for _ in $(seq 1 100); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    kill -KILL -- "-$pid" 2>/dev/null || true
    reap_orphan_exiftool
    say "$name stopped"
  fi
  rm -f "$f"
}
