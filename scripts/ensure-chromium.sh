#!/usr/bin/env bash
# Makes sure the browser the end-to-end tests drive (tests/e2e) is installed: Debian's Chromium
# at /usr/bin/chromium. Run by `npm run test:e2e` (part of `npm test`) and by .ci/run.
#   - present            → exit 0
#   - missing, as root   → apt-get update && apt-get install -y chromium; exit with apt's status
#   - missing, not root  → say how to install it; exit 1
set -u

CHROMIUM=/usr/bin/chromium

if [ -x "$CHROMIUM" ]; then
  exit 0
fi

if [ "$(id -u)" -eq 0 ]; then
  echo "ensure-chromium: $CHROMIUM is missing; installing the chromium package with apt-get…" >&2
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq || exit $?
  apt-get install -y -q chromium
  exit $?
fi

cat >&2 <<MSG
ensure-chromium: $CHROMIUM is missing, and installing it needs root.
The end-to-end tests (tests/e2e) drive Debian's Chromium. Install it with:

  sudo apt-get update && sudo apt-get install -y chromium

then run the tests again.
MSG
exit 1
