#!/usr/bin/python3
"""Writes tests/fixtures/scipy-assignment.json: minimum-cost assignments computed by
SciPy, that tests/unit/mixture/assignment.test.ts compares lib/mixture/assignment.ts with.

Run from the repository root with Debian's interpreter and packages:
    /usr/bin/python3 tests/reference/generate_scipy_assignment.py
(python3-scipy, python3-numpy; the versions used are recorded in the output).

Matrices are drawn with numpy's default_rng(SEED): square and rectangular (wide and
tall), uniform reals, reals with negatives and a wide scale, small integers (many tied
optima), matrices with zero rows, columns or blocks, and an all-zero matrix.
For each: scipy.optimize.linear_sum_assignment(cost) -> the row/column pairs and the total
cost (summed from the matrix), and whether the optimum is unique. Unique is decided
exactly: an optimum is unique iff forbidding any one of its pairs (that entry set to
+inf, solved again) makes the best total strictly larger (by more than 1e-9), because
any other optimum must leave out at least one of its pairs.
"""
import json
import os

import numpy as np
import scipy
from scipy.optimize import linear_sum_assignment

SEED = 20261203
ROOT = os.path.abspath(os.path.join(os.path.dirname(__file__), "..", ".."))
OUT = os.path.join(ROOT, "tests", "fixtures", "scipy-assignment.json")


def solve(cost):
    rows, cols = linear_sum_assignment(cost)
    return [[int(r), int(c)] for r, c in zip(rows, cols)], float(cost[rows, cols].sum())


def is_unique(cost, pairs, total):
    for r, c in pairs:
        blocked = cost.copy()
        blocked[r, c] = np.inf
        try:
            _, other = solve(blocked)
        except ValueError:  # no feasible matching left without this pair
            continue
        if not other > total + 1e-9:
            return False
    return True


def main():
    rng = np.random.default_rng(SEED)
    cases = []

    def add(name, cost):
        cost = np.asarray(cost, dtype=float)
        pairs, total = solve(cost)
        cases.append({
            "name": name,
            "rows": int(cost.shape[0]),
            "cols": int(cost.shape[1]),
            "cost": [float(v) for v in cost.ravel()],
            "pairs": pairs,
            "total": total,
            "unique": is_unique(cost, pairs, total),
        })

    for n in (1, 2, 3, 4, 5, 6, 8, 10):
        add(f"uniform square {n}x{n}", rng.uniform(0, 1, size=(n, n)))
    for n, m in ((2, 5), (3, 7), (5, 3), (7, 4), (1, 4), (4, 1), (6, 9)):
        add(f"uniform {n}x{m}", rng.uniform(0, 1, size=(n, m)))
    add("wide scale with negatives 5x5", rng.normal(0, 1, size=(5, 5)) * 10.0 ** rng.integers(-3, 4, size=(5, 5)))
    add("negatives 4x6", rng.uniform(-50, 50, size=(4, 6)))
    for n, m in ((4, 4), (6, 6), (3, 5), (6, 4)):
        add(f"small integers (ties) {n}x{m}", rng.integers(0, 3, size=(n, m)))
    add("all zeros 4x4", np.zeros((4, 4)))
    add("all zeros 3x5", np.zeros((3, 5)))
    z = rng.uniform(0, 1, size=(5, 5))
    z[1, :] = 0.0
    z[:, 3] = 0.0
    add("zero row and column 5x5", z)
    z = rng.uniform(1, 2, size=(6, 6))
    z[:3, :3] = 0.0
    add("zero block 6x6", z)
    z = rng.uniform(0, 1, size=(4, 6))
    z[:, 0] = 0.0
    add("zero column 4x6", z)
    add("identical rows 3x4", np.tile(rng.uniform(0, 1, size=(1, 4)), (3, 1)))

    out = {
        "source": "scipy.optimize.linear_sum_assignment",
        "scipy": scipy.__version__,
        "numpy": np.__version__,
        "seed": SEED,
        "cases": cases,
    }
    with open(OUT, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")
    print(f"wrote {len(cases)} cases to {os.path.relpath(OUT, ROOT)} "
          f"({sum(c['unique'] for c in cases)} with a unique optimum)")


if __name__ == "__main__":
    main()
