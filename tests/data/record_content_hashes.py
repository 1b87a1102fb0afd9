"""Record the content hashes and simplex lists of a few thousand varied complexes.

Run once with the code *before* the per-case speed-ups (issue 11) to write
``tests/data/content_hashes.json``; ``tests/test_case_kernels.py`` then checks that the
current code builds the same complexes and gives them the same ``content_hash``:

    .venv/bin/python tests/data/record_content_hashes.py

Per family table, for each case: the case id, the first 24 hex digits of the SHA-256 of the
complex's (labels, simplices) and of its ``content_hash`` (96 bits each: a change that
kept either prefix would be a SHA-256 collision).
"""

import hashlib
import json
import subprocess
from itertools import islice
from pathlib import Path

from verifier.families import make_family

SPECS = [
    ({"family": "all-complexes", "max_vertices": 5}, None),
    ({"family": "graphs", "as": "flag"}, None),
    ({"family": "graphs", "as": "1-dimensional"}, 400),
    ({"family": "random-flag", "vertices": [8, 10], "edge_probability": 0.5, "count": 600,
      "seed": 3}, None),
    ({"family": "random-flag", "vertices": [8, 10], "edge_probability": 0.8, "count": 200,
      "seed": 4}, None),
    ({"family": "random-flag", "vertices": [8, 10], "edge_probability": 0.25, "count": 150,
      "seed": 5}, None),
    ({"family": "random-flag", "vertices": [9, 10], "edge_probability": 1.0, "count": 2,
      "seed": 6}, None),
    ({"family": "random-flag", "vertices": [1, 3], "edge_probability": 0.5, "count": 20,
      "seed": 7}, None),
    ({"family": "random-flag", "vertices": [11, 16], "edge_probability": 0.4, "count": 25,
      "seed": 8}, None),
    ({"family": "random-pure", "vertices": [5, 10], "dimension": 2,
      "facet_probability": 0.3, "count": 60, "seed": 9}, None),
    ({"family": "linial-meshulam", "vertices": [5, 9], "probability": 0.3, "count": 60,
      "seed": 10}, None),
    ({"family": "random-geometric", "vertices": [6, 12], "radius": 0.5, "count": 60,
      "seed": 11}, None),
    ({"family": "catalog"}, None),
    ({"family": "cycles", "lengths": [3, 14]}, None),
]


def digest(text: str) -> str:
    return hashlib.sha256(text.encode()).hexdigest()[:24]


def record() -> dict:
    groups = []
    for spec, cap in SPECS:
        family = make_family(dict(spec))
        cases = []
        for case_id in islice(family.case_ids(), cap):
            K = family.get(case_id)
            cases.append([case_id, digest(repr((K.labels, K.simplices))),
                          K.content_hash[:24]])
        groups.append({"spec": spec, "cases": cases})
    commit = subprocess.run(["git", "rev-parse", "HEAD"], capture_output=True,
                            text=True).stdout.strip()
    return {"how": "written by tests/data/record_content_hashes.py with the code of commit "
                   f"{commit} (before the per-case speed-ups of issue 11)",
            "groups": groups}


if __name__ == "__main__":
    out = Path(__file__).with_name("content_hashes.json")
    data = record()
    out.write_text(json.dumps(data, separators=(",", ":")) + "\n")
    print(sum(len(g["cases"]) for g in data["groups"]), "cases written to", out)
