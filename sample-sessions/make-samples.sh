#!/usr/bin/env bash
# Regenerates the three sample sessions from the demo market (invented data and people).
# Run from the repository root: bash sample-sessions/make-samples.sh
set -euo pipefail
comptrail() { cargo run --quiet --release -p cli -- "$@"; }
market=assets/demo-market.csv

# sample NAME SUBJECT APPRAISER NOTES [worksheet and adjustment options...]
sample() {
  local name=$1 subject=$2 appraiser=$3 notes=$4
  shift 4
  comptrail appraise "$market" --subject "$subject" "$@" \
    --appraiser "$appraiser" --notes "$notes" \
    --keep-segment --save-session "sample-sessions/$name.ron" > /dev/null
}

sample dealer-trade-in \
  "year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles=41000,condition=used,vin=0UT4PL220N7M01556,options=sunroof;tow package" \
  "Dana Vell, used-vehicle manager (invented)" \
  "Customer trading toward a new Tessel. Front tires at 3/32; small dent on the rear door. Offer valid 7 days." \
  --trade-in sample-sessions/worksheets/dealer-trade-in.ron --as-of 2026-11-30 \
  --stock-number "T-26-0412" --customer "Imre Castell (invented)"

sample total-loss-claim \
  "year=2021,make=Quellmark,model=Brindle,variant=Durnow,miles=52300,condition=used,vin=0UB7TR216M5K00441,options=driver assist" \
  "Rowan Ilse, claims adjuster (invented)" \
  "Collision with a fixed object. Repair estimate from the insured's chosen shop; salvage bid from the regular yard." \
  --claim sample-sessions/worksheets/total-loss-claim.ron \
  --claim-number "CL-2026-118304" --date-of-loss 2026-11-30 \
  --insured "Maren Oduya (invented)" --loss-type collision \
  --adjust "prior-damage:-650:unrepaired hail damage on the roof before this loss, adjuster photos 3-7" \
  --adjust "condition:-400:interior wear beyond typical for the age, driver seat bolster torn"

sample near-threshold-claim \
  "year=2023,make=Orvane,model=Kestrel,variant=Halvet,miles=30500,condition=used,vin=0RK9TD239P2P00773" \
  "Rowan Ilse, claims adjuster (invented)" \
  "Repair estimate is 74.9 % of ACV, under the profile's 75 %: repair, not a total loss. A supplement over about \$25 would cross the threshold; re-run the total-loss test if one arrives." \
  --claim sample-sessions/worksheets/near-threshold-claim.ron \
  --claim-number "CL-2026-118977" --date-of-loss 2026-11-30 \
  --insured "Teodor Vance (invented)" --loss-type hail

for s in dealer-trade-in total-loss-claim near-threshold-claim; do
  comptrail appraise --session "sample-sessions/$s.ron" | grep "^reproduces\|^DOES NOT"
done
