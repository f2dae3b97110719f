"""`eigenframe run --export-matrices DIR` checked from outside, with SciPy as the reference.

Small models from scripts/genmodel.py (a 3-storey building and a platform grid, scenarios
of our own) are run with the export; the files are read with scipy.io.mmread (an
independent Matrix Market reader) and solved densely with LAPACK through scipy.linalg:
the 10 natural frequencies and the 4 critical load factors must match what the program
wrote in its HDF5 results to 1e-8 (both sides solve K phi = w^2 M phi and
(K + lambda K_G) phi = 0 on the same matrices; the difference is the iterative solver's
accuracy, tol 1e-12 in ARPACK). The DOF map is checked against the model's nodes, and the
exported M against the participating mass in the results file.
"""
import csv
import math
import subprocess
import sys
from pathlib import Path

import h5py
import numpy as np
import pytest
import scipy.io
import scipy.linalg

from efrun import ROOT, ef_bin, run  # noqa: E402  (shared helpers)
GEN = ROOT / "scripts" / "genmodel.py"


def export(tmp, kind, *args):
    model = tmp / f"{kind}.yaml"
    g = subprocess.run([sys.executable, str(GEN), kind, str(model), *args],
                       capture_output=True, text=True, timeout=60)
    assert g.returncode == 0, g.stderr
    dof = int(g.stderr.split(" free DOF")[0].rsplit(" ", 1)[1])
    p = subprocess.run([ef_bin(), "run", model.name, "-q", "--export-matrices", "mtx"],
                       cwd=tmp, capture_output=True, text=True, timeout=300)
    assert p.returncode == 0, p.stderr
    d = tmp / "mtx"
    mats = {k: scipy.io.mmread(str(d / f"{k}.mtx")).toarray() for k in ("K", "M", "KG")}
    with open(d / "dofmap.csv", newline="") as f:
        rows = list(csv.DictReader(f))
    return dof, mats, rows, tmp / f"{kind}.h5", model


@pytest.fixture(scope="module", params=[("building", "--nx", "2", "--ny", "2", "--storeys", "3"),
                                        ("platform", "--nx", "4", "--ny", "3")])
def exported(request, tmp_path_factory):
    kind, *args = request.param
    return export(tmp_path_factory.mktemp(kind), kind, *args)


def test_export_matrices_are_symmetric_and_sized_as_the_generator_says(exported):
    dof, mats, rows, _, _ = exported
    for k, A in mats.items():
        assert A.shape == (dof, dof), k
        assert np.array_equal(A, A.T), k                  # mmread mirrors the lower triangle
    assert len(rows) == dof
    assert [int(r["equation"]) for r in rows] == list(range(1, dof + 1))
    np.linalg.cholesky(mats["K"])                          # K of a held structure: SPD


def test_export_frequencies_match_a_dense_solve(exported):
    _, mats, _, h5, _ = exported
    w2 = scipy.linalg.eigh(mats["K"], mats["M"], eigvals_only=True, subset_by_index=[0, 9])
    f_ref = np.sqrt(w2) / (2 * math.pi)
    with h5py.File(h5, "r") as f:
        f_ef = f["/modal/frequencies"][()]
    assert len(f_ef) == 10
    assert np.max(np.abs(f_ef - f_ref) / f_ref) < 1e-8


def test_export_buckling_factors_match_a_dense_solve(exported):
    _, mats, _, h5, _ = exported
    mu = scipy.linalg.eigh(-mats["KG"], mats["K"], eigvals_only=True)    # -K_G x = mu K x
    lam = np.sort(1.0 / mu[mu > 1e-10 * np.max(np.abs(mu))])[:4]
    with h5py.File(h5, "r") as f:
        grp = f["/buckling"]
        name = list(grp.keys())[0]
        lam_ef = grp[name]["factors"][()]
    assert len(lam_ef) == 4
    assert np.max(np.abs(lam_ef - lam) / lam) < 1e-8


def test_export_dofmap_and_mass_agree_with_the_results_file(exported):
    _, mats, rows, h5, model = exported
    text = model.read_text()
    names = {line.split(":")[0].strip() for line in text.split("nodes:\n", 1)[1].split("members:")[0].splitlines()}
    r = np.array([1.0 if row["dof"] == "ux" else 0.0 for row in rows])
    for row in rows:
        assert row["dof"] in ("ux", "uy", "uz", "rx", "ry", "rz")
        assert row["node"] in names or row["node"].startswith("member ")
    with h5py.File(h5, "r") as f:
        m_x = f["/modal/participating_mass"][0]
    assert r @ mats["M"] @ r == pytest.approx(m_x, rel=1e-12)
