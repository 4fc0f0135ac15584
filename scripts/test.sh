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

# Debian packages the tests need: chromium for the browser tests, postgresql for the API suites run
# against a real PostgreSQL server and the shared job queue test.
need_packages=()
[ -x /usr/bin/chromium ] || need_packages+=(chromium)
ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1 || need_packages+=(postgresql)
if [ "${#need_packages[@]}" -gt 0 ]; then
  step "Installing Debian packages: ${need_packages[*]}"
  if [ "$(id -u)" = "0" ]; then
    (apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${need_packages[@]}") || { echo "Could not install ${need_packages[*]} from Debian's packages." >&2; exit 1; }
  elif command -v sudo >/dev/null; then
    (sudo apt-get update -qq && sudo DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${need_packages[@]}") || { echo "Could not install ${need_packages[*]} from Debian's packages." >&2; exit 1; }
  else
    echo "Missing Debian packages and this user cannot install them: apt-get install ${need_packages[*]}" >&2
    exit 1
  fi
fi
/usr/bin/chromium --version
ls -d /usr/lib/postgresql/*/bin | head -1

step "Unit, API and component tests (jest)"
npx jest --selectProjects node components --ci

step "API and database tests again, against a PostgreSQL server on loopback (TEST_DATABASE_URL)"
npx tsx scripts/postgres-local.ts -- npx jest tests/server tests/db --selectProjects node --ci --testPathIgnorePatterns jobQueue

step "Web export (expo export --platform web)"
CI=1 EXPO_NO_TELEMETRY=1 npx expo export --platform web --output-dir dist

step "Browser tests (playwright-core + Debian Chromium)"
npx jest -c jest.e2e.config.js --runInBand --ci
