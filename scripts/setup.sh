#!/usr/bin/env bash
# Installs what is missing: Debian packages (once) and npm packages (when the
# lockfile changed). Safe to run again; quick when nothing is missing.
. "$(dirname "$0")/lib/common.sh"

APT_PACKAGES=(postgresql redis-server chromium libraw-bin perl python3-astropy python3-opencv python3-skimage python3-numpy python3-pyavm python3-ccdproc python3-reproject)

missing=()
for p in "${APT_PACKAGES[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ "${#missing[@]}" -gt 0 ]; then
  say "installing Debian packages: ${missing[*]}"
  SUDO=""
  is_root || SUDO="sudo"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}" >"$LOGS/apt.log" 2>&1 \
    || die "apt-get install failed; see $LOGS/apt.log"
fi

# npm install from the lockfile when it changed. (npm ci trips on an npm bug with
# exiftool-vendored's Windows-only optional package missing from the lockfile.)
stamp="$ROOT/node_modules/.crownlight-lock"
if [ ! -f "$stamp" ] || ! cmp -s "$ROOT/package-lock.json" "$stamp"; then
  say "installing npm packages (npm install from the lockfile)"
  (cd "$ROOT" && npm install --no-audit --no-fund --loglevel=error) || die "npm install failed"
  cp "$ROOT/package-lock.json" "$stamp"
fi
