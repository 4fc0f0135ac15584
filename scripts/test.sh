#!/usr/bin/env bash
# `npm test`: types, lint, the unit/API/component suites, then the web export and the browser tests
# in Debian's Chromium. Any failure stops the run with a non-zero exit.
set -euo pipefail
cd "$(dirname "$0")/.."

step() { printf '\n\033[1m== %s\033[0m\n' "$*"; }

step "Type check (tsc --noEmit, strict)"
npx tsc --noEmit -p .

step "Lint (eslint)"
npx eslint . --max-warnings 0

step "Unit, API and component tests (jest)"
npx jest --selectProjects node components --ci

step "Chromium for the browser tests"
if [ ! -x /usr/bin/chromium ]; then
  if [ "$(id -u)" = "0" ]; then
    (apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium) || { echo "Could not install Debian's chromium package; the browser tests cannot run." >&2; exit 1; }
  elif command -v sudo >/dev/null; then
    (sudo apt-get update -qq && sudo DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium) || { echo "Could not install Debian's chromium package; the browser tests cannot run." >&2; exit 1; }
  else
    echo "/usr/bin/chromium is missing and this user cannot install it: apt-get install chromium" >&2
    exit 1
  fi
fi
/usr/bin/chromium --version

step "Web export (expo export --platform web)"
CI=1 EXPO_NO_TELEMETRY=1 npx expo export --platform web --output-dir dist

step "Browser tests (playwright-core + Debian Chromium)"
npx jest -c jest.e2e.config.js --runInBand --ci
