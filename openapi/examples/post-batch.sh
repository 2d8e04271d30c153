#!/usr/bin/env bash
# Post one batch of galaxies and download the CSV export.
# Usage: RATIOGRAPH_KEY=rg_… PROJECT_ID=… ./post-batch.sh [base-url]
set -euo pipefail
BASE="${1:-http://127.0.0.1:8080}/api/v1"
curl -sS --fail-with-body -X POST "$BASE/projects/$PROJECT_ID/galaxies/batch" \
  -H "Authorization: Bearer $RATIOGRAPH_KEY" -H 'Content-Type: application/json' \
  -H "Idempotency-Key: example-$(date +%Y%m%d)-001" \
  -d '{"galaxies":[
        {"id":"LNS-0000001","redshift":0.05,"fluxUnit":1e-17,
         "lines":{"halpha":{"flux":300,"error":6},"hbeta":{"flux":80,"error":3},
                  "nii_6584":{"flux":95,"error":4},"oiii_5007":{"flux":70,"error":3},
                  "sii_6717":{"flux":40,"error":2},"sii_6731":{"flux":30,"error":2},
                  "oi_6300":{"upperLimit":9}},
         "ew":{"halpha":24.5}}]}'
echo
curl -sS --fail-with-body -H "Authorization: Bearer $RATIOGRAPH_KEY" -o galaxies.csv \
  "$BASE/projects/$PROJECT_ID/exports/galaxies.csv"
echo "wrote galaxies.csv"
