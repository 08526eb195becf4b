#!/usr/bin/env bash
# Installs the Debian 12 packages listed in scripts/debian-packages.txt that are
# missing. Safe to run again: when everything is present it does nothing.
set -euo pipefail
here=$(cd "$(dirname "$0")" && pwd)
mapfile -t wanted < <(grep -v '^\s*#' "$here/debian-packages.txt" | sed '/^\s*$/d')
missing=()
for pkg in "${wanted[@]}"; do
  if ! dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q "install ok installed"; then
    missing+=("$pkg")
  fi
done
# npm fetches the pinned test data (scripts/fetch-test-data.sh). Checked by
# command, not package: a machine may have its own Node.js with npm, and
# Debian's npm must not be installed over it.
if ! command -v npm >/dev/null 2>&1; then
  missing+=(nodejs npm)
fi
if [ ${#missing[@]} -eq 0 ]; then
  exit 0
fi
echo "install-deps: installing ${missing[*]}" >&2
run_as_root=()
if [ "$(id -u)" -ne 0 ]; then
  if command -v sudo >/dev/null 2>&1; then
    run_as_root=(sudo)
  else
    echo "install-deps: these packages are missing and this is not root: ${missing[*]}" >&2
    echo "install-deps: run 'scripts/install-deps.sh' as root, or install them with apt-get." >&2
    exit 1
  fi
fi
export DEBIAN_FRONTEND=noninteractive
"${run_as_root[@]}" apt-get update -qq
"${run_as_root[@]}" apt-get install -y -qq --no-install-recommends "${missing[@]}"
