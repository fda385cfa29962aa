#!/usr/bin/env bash
# The demo: check and stratify both demo sellers' tapes, then show `check` on the bad tape.
# Usage: demo-pools/demo.sh [path/to/poolbid]   (default: build/poolbid)
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
poolbid="${1:-$here/../build/poolbid}"

say() { printf '\n==== %s\n' "$*"; }

say "Brindlecote Home Loans (strict underwriting): check"
"$poolbid" check "$here/brindlecote-strict.csv"
say "Brindlecote Home Loans (strict underwriting): strats"
"$poolbid" strats "$here/brindlecote-strict.csv"

say "Sallowmere Funding (loose underwriting, its own headers, read through a column map): check"
"$poolbid" check "$here/sallowmere-loose.csv" --map "$here/sallowmere.map.json"
say "Sallowmere Funding (loose underwriting): strats"
"$poolbid" strats "$here/sallowmere-loose.csv" --map "$here/sallowmere.map.json"

say "A tape with planted mistakes: every bad row is listed, none dropped (exit code 3)"
status=0
"$poolbid" check "$here/bad-tape.csv" || status=$?
if [ "$status" -ne 3 ]; then
  echo "demo: expected exit code 3 (rows rejected) from the bad tape, got $status" >&2
  exit 1
fi
echo "(exit code 3: some rows rejected, as planted)"
