"""Writes tests/fixtures/assignment.json: cost matrices and SciPy's optimal assignments.

Reference: scipy.optimize.linear_sum_assignment (the version is recorded in the fixture).
Run from the repository root:  python3 tests/reference/make_assignment_fixtures.py
"""
import json
import pathlib

import numpy as np
import scipy
from scipy.optimize import linear_sum_assignment

rng = np.random.default_rng(20261202)
cases = []


def add(name, cost):
    cost = np.asarray(cost, dtype=float)
    rows, cols = linear_sum_assignment(cost)
    cases.append(
        {
            "name": name,
            "rows": int(cost.shape[0]),
            "cols": int(cost.shape[1]),
            "cost": [float(v) for v in cost.ravel()],
            "pairs": [[int(r), int(c)] for r, c in zip(rows, cols)],
            "total": float(cost[rows, cols].sum()),
        }
    )


for n, m in [(1, 1), (2, 2), (3, 3), (5, 5), (8, 8), (20, 20), (50, 50), (3, 7), (7, 3), (1, 9), (9, 1), (30, 45), (45, 30)]:
    add(f"uniform {n}x{m}", rng.random((n, m)))
for k in range(5):
    add(f"uniform scaled 1e3 10x12 #{k}", rng.random((10, 12)) * 1000.0)
add("negative entries 6x6", rng.normal(size=(6, 6)))
add("all equal 4x4", np.full((4, 4), 0.5))
add("all zero 3x5", np.zeros((3, 5)))
add("ties 4x4", rng.integers(0, 3, size=(4, 4)))
add("ties rectangular 5x8", rng.integers(0, 2, size=(5, 8)))
add("one-minus-iou like 6x6", 1.0 - np.clip(rng.random((6, 6)) ** 4, 0, 1))
add("identity is best 5x5", 1.0 - np.eye(5))
add("large values 4x4", rng.random((4, 4)) * 1e9)

out = {
    "source": f"scipy {scipy.__version__} scipy.optimize.linear_sum_assignment, numpy {np.__version__}",
    "cases": cases,
}
path = pathlib.Path("tests/fixtures/assignment.json")
path.write_text(json.dumps(out, indent=1) + "\n")
print(f"wrote {path} with {len(cases)} cases")
