"""Post galaxies in batches of up to 10,000 and download the VOTable export.

Usage: RATIOGRAPH_KEY=rg_... PROJECT_ID=... python3 post_batch.py [base-url]
"""
import os
import sys

import requests

BASE = (sys.argv[1] if len(sys.argv) > 1 else "http://127.0.0.1:8080") + "/api/v1"
PROJECT = os.environ["PROJECT_ID"]
session = requests.Session()
session.headers["Authorization"] = f"Bearer {os.environ['RATIOGRAPH_KEY']}"


def post_batches(galaxies, run_id, size=10_000):
    for start in range(0, len(galaxies), size):
        part = galaxies[start:start + size]
        # the same key and body can be resent safely after a timeout: the first answer comes back
        r = session.post(f"{BASE}/projects/{PROJECT}/galaxies/batch", json={"galaxies": part},
                         headers={"Idempotency-Key": f"{run_id}-{start // size:05d}"}, timeout=300)
        if r.status_code == 422:
            for e in r.json()["errors"][:20]:
                print("rejected:", e["path"], e["message"])
        r.raise_for_status()
        print(f"batch {start // size}: {r.json()['inserted']} new, {r.json()['updated']} updated")


galaxies = [{"id": "LNS-0000001", "redshift": 0.05, "fluxUnit": 1e-17,
             "lines": {"halpha": {"flux": 300, "error": 6}, "hbeta": {"flux": 80, "error": 3},
                       "nii_6584": {"flux": 95, "error": 4}, "oiii_5007": {"upperLimit": 9}},
             "ew": {"halpha": 24.5}}]
post_batches(galaxies, run_id="example-run")

with session.get(f"{BASE}/projects/{PROJECT}/exports/galaxies.vot", stream=True, timeout=600) as resp:
    resp.raise_for_status()
    with open("galaxies.vot", "wb") as f:
        for chunk in resp.iter_content(1 << 16):
            f.write(chunk)
print("wrote galaxies.vot")
