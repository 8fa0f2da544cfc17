#!/usr/bin/env python3
"""Reference values for aislecast.core.diag, computed by an independent library.

Library: ArviZ 0.23.4 (arviz.rhat / arviz.ess / arviz.mcse on numpy arrays shaped
(chains, draws)), with numpy for quantiles, mean and sd. Run with Python 3.11, numpy 2.4,
scipy 1.17:

    pip install arviz==0.23.4
    python3 tools/diag-fixture/make_fixture.py

It writes core/src/test/resources/diag/arviz_fixture.json (path relative to the repository
root, found from this file's location). Every chain set is drawn from a seeded numpy
generator and rounded to 10 significant digits *before* ArviZ sees it, so the JSON holds
exactly the doubles that the reference values were computed from. NaN results are written
as JSON null.
"""

import json
import pathlib
import warnings

import numpy as np

warnings.simplefilter("ignore", FutureWarning)
import arviz as az  # noqa: E402  (import after silencing ArviZ's refactor notice)

ARVIZ_VERSION = "0.23.4"
SEED = 20240611
OUT = (pathlib.Path(__file__).resolve().parents[2]
       / "core/src/test/resources/diag/arviz_fixture.json")


def rounded(x):
    return np.array([[float(f"{v:.10g}") for v in row] for row in x])


def ar1(rng, chains, draws, rho):
    """Stationary AR(1) with unit marginal variance."""
    x = np.empty((chains, draws))
    x[:, 0] = rng.standard_normal(chains)
    scale = np.sqrt(1.0 - rho * rho)
    for t in range(1, draws):
        x[:, t] = rho * x[:, t - 1] + scale * rng.standard_normal(chains)
    return x


def chain_sets():
    rng = np.random.default_rng(SEED)
    sets = {}
    sets["iid_normal_4x500"] = rng.standard_normal((4, 500))
    sets["ar1_rho0.9_4x1000"] = ar1(rng, 4, 1000, 0.9)
    shifted = rng.standard_normal((4, 500))
    shifted[3] += 2.0  # one chain stuck in another mode
    sets["shifted_mean_4x500"] = shifted
    sets["student_t_df3_4x500"] = rng.standard_t(3, (4, 500))
    sets["short_ar1_rho0.5_4x50"] = ar1(rng, 4, 50, 0.5)
    # Odd draw count: the split drops the middle draw of every chain.
    sets["odd_draws_ar1_rho0.3_3x101"] = ar1(rng, 3, 101, 0.3)
    # Many ties: exercises average ranks.
    sets["ties_rounded_4x200"] = np.round(rng.standard_normal((4, 200)), 1)
    return {name: rounded(x) for name, x in sets.items()}


def num(v):
    v = float(np.asarray(v))
    return None if np.isnan(v) else v


def reference(x):
    quantiles = np.quantile(x.ravel(), [0.05, 0.5, 0.95])  # numpy default: linear (type 7)
    return {
        "rhat_rank": num(az.rhat(x, method="rank")),
        "rhat_split": num(az.rhat(x, method="split")),
        "ess_bulk": num(az.ess(x, method="bulk")),
        "ess_tail": num(az.ess(x, method="tail")),
        "ess_mean": num(az.ess(x, method="mean")),
        "ess_quantile_0.05": num(az.ess(x, method="quantile", prob=0.05)),
        "ess_quantile_0.95": num(az.ess(x, method="quantile", prob=0.95)),
        "mcse_mean": num(az.mcse(x, method="mean")),
        "mcse_quantile_0.05": num(az.mcse(x, method="quantile", prob=0.05)),
        "mcse_quantile_0.95": num(az.mcse(x, method="quantile", prob=0.95)),
        "mean": num(x.mean()),
        "sd": num(x.std(ddof=1)),
        "q05": num(quantiles[0]),
        "q50": num(quantiles[1]),
        "q95": num(quantiles[2]),
    }


def main():
    assert az.__version__ == ARVIZ_VERSION, az.__version__
    cases = []
    for name, x in chain_sets().items():
        cases.append({"name": name, "chains": x.tolist(), "expected": reference(x)})
    doc = {
        "library": "arviz",
        "library_version": az.__version__,
        "numpy_version": np.__version__,
        "scipy_version": __import__("scipy").__version__,
        "generator": "tools/diag-fixture/make_fixture.py",
        "seed": SEED,
        "layout": "chains[chain][draw]; expected values null where the library returns NaN",
        "cases": cases,
    }
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(doc, indent=1, allow_nan=False) + "\n")
    print(f"wrote {OUT} ({len(cases)} cases)")


if __name__ == "__main__":
    main()
