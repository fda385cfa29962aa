#!/usr/bin/env bash
# The demo: check, stratify, project and price both demo sellers' tapes, first under pool-wide
# curves and then under the loan-level model; compare the sellers, run them through four economies,
# screen kick-outs, reprice a held pool after a shock; then show `check` on the bad tape.
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

# Illustrative assumptions, not a forecast. The curves are pool-wide (they do not read a loan's
# credit), so the loosely underwritten pool is given the heavier default curve by hand.
say "Brindlecote Home Loans: cash flows at 150% PSA prepayment, 100% SDA default, 40% severity, 12-month lag"
"$poolbid" cashflows "$here/brindlecote-strict.csv" --cutoff 2026-12-01 \
  --prepay psa:150 --default sda:100 --severity 40 --lag 12
say "Sallowmere Funding: the same, but 200% SDA default for the looser underwriting (cut-off from its map)"
"$poolbid" cashflows "$here/sallowmere-loose.csv" --map "$here/sallowmere.map.json" \
  --prepay psa:150 --default sda:200 --severity 40 --lag 12

# The bid: both pools valued on the same invented swap curve and bid at the same loss-adjusted
# yield. The tapes carry the same coupons, terms and balances; Sallowmere's looser underwriting is
# given twice Brindlecote's default curve, so its expected loss and credit cost are higher and its
# bid lower -- the difference between the two clean prices is the price of that underwriting.
# Delinquent loans follow the curves here; add --delinquent-default to have loans 90+ days
# delinquent or in foreclosure default in month 1 (Sallowmere has 26 of them).
say "Brindlecote Home Loans: the bid at a 6.50% loss-adjusted yield (150% PSA, 100% SDA, 40% severity)"
"$poolbid" price "$here/brindlecote-strict.csv" --cutoff 2026-12-01 \
  --curve "$here/curve-2026-12-01.json" --settle 2026-12-17 \
  --prepay psa:150 --default sda:100 --severity 40 --lag 12 --target-yield 6.5
say "Sallowmere Funding: the bid at the same 6.50% yield, with 200% SDA for the looser underwriting"
"$poolbid" price "$here/sallowmere-loose.csv" --map "$here/sallowmere.map.json" \
  --curve "$here/curve-2026-12-01.json" --settle 2026-12-17 \
  --prepay psa:150 --default sda:200 --severity 40 --lag 12 --target-yield 6.5
say "Sallowmere Funding: the bid at a 250 bp loss-adjusted Z-spread over the invented treasury curve"
"$poolbid" price "$here/sallowmere-loose.csv" --map "$here/sallowmere.map.json" \
  --curve "$here/treasury-2026-12-01.json" --settle 2026-12-17 \
  --prepay psa:150 --default sda:200 --severity 40 --lag 12 --target-spread 250

# The loan-level model: each loan's default, severity and prepayment follow its own credit (score,
# LTV, DTI, documentation, occupancy, purpose, delinquency) and the economy after the sale, so the
# looser underwriting shows up in price without a curve set by hand. Illustrative tables, not a
# calibration; the servicer advances interest on defaulted loans until the sale.
model=(--curve "$here/curve-2026-12-01.json" --settle 2026-12-17 --target-yield 6.5 --advancing interest)
sallowmere=("$here/sallowmere-loose.csv" --map "$here/sallowmere.map.json")
say "Brindlecote Home Loans: the bid at 6.50% under the loan-level model (base scenario)"
"$poolbid" price "$here/brindlecote-strict.csv" --cutoff 2026-12-01 --model "${model[@]}" \
  --key-rates none
say "Sallowmere Funding: the same, with why the model treats one delinquent loan as it does"
"$poolbid" price "${sallowmere[@]}" --model "${model[@]}" --key-rates none --explain SMF-000085

say "The two sellers compared at 6.50%: the price gap attributed to underwriting factors"
"$poolbid" compare "$here/brindlecote-strict.csv" "$here/sallowmere-loose.csv" \
  --map "$here/sallowmere-loose.csv=$here/sallowmere.map.json" --cutoff 2026-12-01 "${model[@]}"
say "Both sellers in four economies, judged before the fact"
"$poolbid" matrix "$here/brindlecote-strict.csv" "$here/sallowmere-loose.csv" \
  --map "$here/sallowmere-loose.csv=$here/sallowmere.map.json" --cutoff 2026-12-01 "${model[@]}"

say "Sallowmere Funding: kick-outs against the illustrative credit box, and the bid without them"
"$poolbid" price "${sallowmere[@]}" --model "${model[@]}" --key-rates none \
  --kickouts --box "$here/credit-box.json"

say "A risk desk holding Brindlecote's pool at 99: repriced after a severe downturn"
"$poolbid" shock "$here/brindlecote-strict.csv" --cutoff 2026-12-01 \
  --curve "$here/curve-2026-12-01.json" --settle 2026-12-17 --held-price 99 \
  --scenario severe_downturn

say "A tape with planted mistakes: every bad row is listed, none dropped (exit code 3)"
status=0
"$poolbid" check "$here/bad-tape.csv" || status=$?
if [ "$status" -ne 3 ]; then
  echo "demo: expected exit code 3 (rows rejected) from the bad tape, got $status" >&2
  exit 1
fi
echo "(exit code 3: some rows rejected, as planted)"
