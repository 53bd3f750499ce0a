#!/usr/bin/env bash
# The browser tests drive Debian's Chromium through playwright-core (no browser
# download). Install it on a fresh Debian machine when it is missing.
set -euo pipefail
CHROMIUM=${CHROMIUM_PATH:-/usr/bin/chromium}
[ -x "$CHROMIUM" ] && exit 0
if [ "$(id -u)" = "0" ] && command -v apt-get >/dev/null 2>&1; then
  echo "rholog: installing Debian's chromium for the browser tests"
  apt-get update -qq
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends chromium >/dev/null
else
  echo "rholog: the browser tests need Chromium at $CHROMIUM (Debian: sudo apt-get install chromium), or set CHROMIUM_PATH." >&2
  exit 1
fi
