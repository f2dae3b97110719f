"""The HDF5 results file, read with h5py as an outside user would (docs/results-format.md).

Runs `$EF_BIN run` on tests/models/good/portal_two_bay_masses.yaml (a model of our own whose
mass is three point masses on free nodes, so M is known exactly from the model file), then
checks the file: every contract path, shapes, units, values equal to the text report,
the mass normalisation recomputed from the model's masses, the static sign conventions,
and that `show` reprints the report and `plot` writes well-formed SVG.
"""
import math
import re
import shutil
import xml.etree.ElementTree as ET
from pathlib import Path

import h5py
import numpy as np
import pytest
import yaml

from efrun import ROOT, ef_bin, run  # noqa: E402  (shared helpers)
MODEL = ROOT / "tests" / "models" / "good" / "portal_two_bay_masses.yaml"
SVG = "{http://www.w3.org/2000/svg}"


def run_model(tmp, model_path, text=None):
    """Copy a model into tmp (or write `text` there), run it, return (h5 path, stdout)."""
    dst = tmp / (model_path.name if model_path else "model.yaml")
    if text is None:
        shutil.copy(model_path, dst)
    else:
        dst.write_text(text)
    p = run("run", dst.name, cwd=tmp)
    assert p.returncode == 0, p.stderr
    h5 = dst.with_suffix(".h5")
    if not h5.exists():
        pytest.skip("`eigenframe run` wrote no HDF5 file next to the model (not wired in yet)")
    return h5, p.stdout


@pytest.fixture(scope="module")
def portal(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("portal")
    h5, report = run_model(tmp, MODEL)
    with open(MODEL) as fh:
        model = yaml.safe_load(fh)
    return {"h5": h5, "report": report, "model": model, "dir": tmp}


def names(ds):
    return [s for s in ds.asstr()[...]]


# ---- layout ----------------------------------------------------------------------------

LOADS = ["roof", "wind", "sideways", "ULS"]
MEMBERS = ["CA", "CB", "CC", "BL", "BR"]


def test_every_contract_path_and_root_attribute_is_present(portal):
    with h5py.File(portal["h5"], "r") as f:
        a = f.attrs
        assert a["format"] == "eigenframe-results"
        assert int(a["format_version"]) == 1
        for key in ["program_version", "model_file", "model_sha256", "created_utc",
                    "units_force", "units_length", "units_mass"]:
            assert isinstance(a[key], str) and a[key], key
        assert (a["units_force"], a["units_length"], a["units_mass"]) == ("kN", "m", "t")
        assert re.fullmatch(r"[0-9a-f]{64}", a["model_sha256"])
        assert re.fullmatch(r"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ", a["created_utc"])
        paths = ["/model/nodes/names", "/model/nodes/xyz", "/model/members/names",
                 "/model/members/nodes", "/model/members/axes", "/model/members/length",
                 "/model/members/stations", "/model/supports/node", "/model/supports/held",
                 "/model/supports/springs", "/model/loads/names", "/model/loads/kind",
                 "/modal/frequencies", "/modal/periods", "/modal/shapes", "/modal/participation",
                 "/modal/effective_mass", "/modal/effective_mass_ratio", "/modal/total_mass",
                 "/modal/modal_mass_unitmax", "/modal/participating_mass",
                 "/buckling/ULS/factors", "/buckling/ULS/shapes", "/buckling/ULS/member_share",
                 "/buckling/ULS/kind", "/buckling/ULS/axial_force",
                 "/second_order/ULS/amplification"]
        for load in LOADS:
            for ds in ["displacements", "reactions", "end_forces"]:
                paths.append(f"/static/{load}/{ds}")
            for m in MEMBERS:
                paths.append(f"/static/{load}/stations/{m}")
        for ds in ["displacements", "reactions", "end_forces"]:
            paths.append(f"/second_order/ULS/{ds}")
        missing = [p for p in paths if p not in f]
        assert not missing
        assert f["/modal"].attrs["normalisation"] == "mass"
        assert f["/modal"].attrs["mass_source"]
        assert f["/modal"].attrs["reference_point"].shape == (3,)
        assert f["/modal"].attrs["residuals"].shape == (6,)
        assert f["/buckling/ULS"].attrs["load"] == "ULS"
        so = f["/second_order/ULS"].attrs
        for key in ["iterations", "converged", "tolerance", "residual", "status"]:
            assert key in so, key
        assert so["status"] in ("converged", "not converged")
        assert list(f["/static"].attrs["loads"]) == LOADS


def test_every_dataset_has_a_unit_and_a_description(portal):
    bad = []

    def visit(name, obj):
        if isinstance(obj, h5py.Dataset):
            u, d = obj.attrs.get("unit"), obj.attrs.get("description")
            if not isinstance(u, str) or not isinstance(d, str) or not d:
                bad.append(name)
            elif u and len(u.split(" ")) not in (1, obj.shape[-1] if obj.ndim else 1):
                bad.append(name + " (unit words do not match the last dimension)")
    with h5py.File(portal["h5"], "r") as f:
        f.visititems(visit)
        assert f["/static/wind/displacements"].attrs["unit"] == "m m m rad rad rad"
        assert f["/static/wind/stations/BL"].attrs["unit"] == "m kN kN kN kN*m kN*m kN*m"
        assert f["/modal/frequencies"].attrs["unit"] == "Hz"
        assert f["/modal/periods"].attrs["unit"] == "s"
    assert not bad


def test_shapes_follow_the_model(portal):
    mdl = portal["model"]
    n, m = len(mdl["nodes"]), len(mdl["members"])
    with h5py.File(portal["h5"], "r") as f:
        assert names(f["/model/nodes/names"]) == list(mdl["nodes"])       # file order
        assert names(f["/model/members/names"]) == list(mdl["members"])
        assert names(f["/model/loads/names"]) == ["roof", "wind", "sideways", "ULS"]
        assert names(f["/model/loads/kind"]) == ["case", "case", "case", "combination"]
        assert f["/model/nodes/xyz"].shape == (n, 3)
        assert f["/model/members/nodes"].shape == (m, 2)
        assert f["/model/members/nodes"].dtype == np.int32
        assert f["/model/members/axes"].shape == (m, 3, 3)
        st = f["/model/members/stations"][...]
        # mesh.stations 9, BR overrides with 13 (the model file)
        assert list(st) == [9, 9, 9, 9, 13]
        for load in LOADS:
            g = f["/static/" + load]
            assert g["displacements"].shape == (n, 6)
            assert g["reactions"].shape == (n, 6)
            assert g["end_forces"].shape == (m, 2, 6)
            for k, mem in enumerate(MEMBERS):
                assert g["stations/" + mem].shape == (st[k], 7)
        k = f["/modal/frequencies"].shape[0]
        assert k == 6                                   # modes: 6 in the model file
        sh = f["/modal/shapes"]
        assert sh.shape == (k, n, 6)
        assert sh.chunks == (1, n, 6) and sh.compression == "gzip"
        assert f["/buckling/ULS/shapes"].chunks == (1, n, 6)
        assert f["/modal/participation"].shape == (k, 6)
        assert f["/modal/total_mass"].shape == (6,)
        assert f["/buckling/ULS/member_share"].shape == (f["/buckling/ULS/factors"].shape[0], m)


def test_model_geometry_matches_the_model_file(portal):
    mdl = portal["model"]
    node_names = list(mdl["nodes"])
    with h5py.File(portal["h5"], "r") as f:
        xyz = f["/model/nodes/xyz"][...]
        ends = f["/model/members/nodes"][...]
        axes = f["/model/members/axes"][...]
        length = f["/model/members/length"][...]
        for i, nm in enumerate(node_names):
            np.testing.assert_array_equal(xyz[i], mdl["nodes"][nm])
        for k, (name, mem) in enumerate(mdl["members"].items()):
            a, b = (node_names.index(x) for x in mem["nodes"])
            assert list(ends[k]) == [a, b]
            d = xyz[b] - xyz[a]
            assert length[k] == pytest.approx(np.linalg.norm(d), rel=1e-14)
            # properties: orthonormal, right-handed, x along the member
            np.testing.assert_allclose(axes[k] @ axes[k].T, np.eye(3), atol=1e-14)
            assert np.linalg.det(axes[k]) == pytest.approx(1.0, abs=1e-14)
            np.testing.assert_allclose(axes[k][0], d / np.linalg.norm(d), atol=1e-14)
        assert names(f["/model/nodes/names"])[f["/model/supports/node"][0]] == "A0"
        assert f["/model/supports/held"][0] == 63          # fixed: all six DOFs


# ---- values ------------------------------------------------------------------------------

def report_table(report, header, first_line, n_rows):
    """Rows after `first_line` (inside the section that starts with `header`): the data
    lines that follow the units line and the rule."""
    sec = report.index(header)
    lines = report[sec:].splitlines()
    i = next(j for j, l in enumerate(lines) if l.startswith(first_line))
    rule = next(j for j in range(i, len(lines)) if lines[j].startswith("-----"))
    return [l.split() for l in lines[rule + 1: rule + 1 + n_rows]]


def test_displacements_and_frequencies_equal_the_text_report(portal):
    rep = portal["report"]
    with h5py.File(portal["h5"], "r") as f:
        nodes = names(f["/model/nodes/names"])
        u = f["/static/wind/displacements"][...]
        rows = report_table(rep, "== linear static: load 'wind' ==", "Node movements", len(nodes))
        for i, row in enumerate(rows):
            assert row[0] == nodes[i]
            vals = np.array([float(x) for x in row[1:7]])
            # the report prints 6 significant digits (%.5e)
            np.testing.assert_allclose(u[i], vals, rtol=1e-5, atol=1e-5 * np.abs(u).max())
        freq = f["/modal/frequencies"][...]
        rows = report_table(rep, "== natural frequencies", "  mode", len(freq))
        for t, row in enumerate(rows):
            assert int(row[0]) == t + 1
            assert freq[t] == pytest.approx(float(row[1]), rel=1e-4)   # %.5g in the report
        fac = f["/buckling/ULS/factors"][...]
        rows = report_table(rep, "== critical load factors", "  mode", len(fac))
        for t, row in enumerate(rows):
            assert fac[t] == pytest.approx(float(row[1]), rel=1e-5)    # %.6g


def test_show_prints_the_same_report_as_run(portal):
    p = run("show", portal["h5"].name, cwd=portal["dir"])
    assert p.returncode == 0, p.stderr
    out = p.stdout
    # `show` adds one block about the file (from "Results file" to the blank line after it)
    start = out.index("Results file ")
    end = out.index("\n\n", start) + 2
    assert out[:start] + out[end:] == portal["report"]
    assert "format 1" in out[start:end]
    p = run("show", portal["h5"].name, "modal", cwd=portal["dir"])
    assert p.returncode == 0 and "== natural frequencies" in p.stdout
    assert "== linear static" not in p.stdout


def test_mode_shapes_are_mass_normalised_with_the_model_masses(portal):
    """With massless members, M is the point masses of the model file: m on ux uy uz, and
    Jx Jy Jz on rx ry rz (model-format.md 'Extra masses'). Then phi^T M phi = 1 and
    phi_i^T M phi_j = 0 (orthogonality of modes, Chopra, Dynamics of Structures [from memory: ch. 10]),
    Gamma_d = phi^T M r_d, effective mass Gamma^2, and r_d^T M r_d from the masses [D]."""
    mdl = portal["model"]
    node_names = list(mdl["nodes"])
    n = len(node_names)
    diag = np.zeros(6 * n)
    for name, spec in mdl["masses"].items():
        i = node_names.index(name)
        if not isinstance(spec, dict):
            spec = {"m": spec}
        diag[6 * i: 6 * i + 3] = spec["m"]
        diag[6 * i + 3: 6 * i + 6] = [spec.get("Jx", 0.0), spec.get("Jy", 0.0), spec.get("Jz", 0.0)]
    with h5py.File(portal["h5"], "r") as f:
        phi = f["/modal/shapes"][...].reshape(-1, 6 * n)
        xyz = f["/model/nodes/xyz"][...]
        O = f["/modal"].attrs["reference_point"]
        gram = phi @ np.diag(diag) @ phi.T
        np.testing.assert_allclose(gram, np.eye(len(phi)), atol=1e-8)
        # influence vectors: unit translations, and unit rotations about O
        r = np.zeros((6, 6 * n))
        for i in range(n):
            for d in range(3):
                r[d, 6 * i + d] = 1.0
                e = np.eye(3)[d]
                r[3 + d, 6 * i: 6 * i + 3] = np.cross(e, xyz[i] - O)
                r[3 + d, 6 * i + 3 + d] = 1.0
        gamma = phi @ np.diag(diag) @ r.T
        np.testing.assert_allclose(f["/modal/participation"][...], gamma, atol=1e-8)
        np.testing.assert_allclose(f["/modal/effective_mass"][...], gamma ** 2, atol=1e-8)
        total = np.einsum("dj,j,dj->d", r, diag, r)
        # masses 4 + 6 + 4 t; RZ about O = (5, 0, 4): 4*5^2 + 4*5^2 + 2.5 = 202.5 t*m^2 [D]
        np.testing.assert_allclose(total[:3], 14.0, rtol=1e-12)
        assert total[5] == pytest.approx(202.5, rel=1e-12)
        np.testing.assert_allclose(O, [5.0, 0.0, 4.0], atol=1e-12)   # centre of mass [D]
        np.testing.assert_allclose(f["/modal/total_mass"][...], total, rtol=1e-10)
        np.testing.assert_allclose(f["/modal/participating_mass"][...], total, rtol=1e-10)
        np.testing.assert_allclose(f["/modal/effective_mass_ratio"][...],
                                   gamma ** 2 / total, rtol=1e-8, atol=1e-12)
        # frequencies, periods, eigenvalues agree; ascending; largest translation positive
        fr = f["/modal/frequencies"][...]
        assert np.all(np.diff(fr) >= 0)
        np.testing.assert_allclose(f["/modal/periods"][...], 1.0 / fr, rtol=1e-14)
        np.testing.assert_allclose(np.sqrt(f["/modal/eigenvalues"][...]) / (2 * math.pi), fr,
                                   rtol=1e-12)
        # sign: the largest translation at a model node is positive; modal_mass_unitmax uses
        # the largest translation over every mesh node, at least the model nodes' largest
        tr = f["/modal/shapes"][:, :, :3].reshape(len(fr), -1)
        big = tr[np.arange(len(fr)), np.argmax(np.abs(tr), axis=1)]
        assert np.all(big > 0)
        assert np.all(f["/modal/modal_mass_unitmax"][...] <= 1.0 / big ** 2 * (1 + 1e-12))


def test_static_results_keep_the_sign_conventions(portal):
    """results-format.md: stations[last] = end_forces[end], stations[0] = -end_forces[start];
    reactions balance the applied load; x runs 0..length."""
    with h5py.File(portal["h5"], "r") as f:
        xyz = f["/model/nodes/xyz"][...]
        length = f["/model/members/length"][...]
        for load in LOADS:
            g = f["/static/" + load]
            ef = g["end_forces"][...]
            scale = np.abs(ef).max()
            for k, mem in enumerate(MEMBERS):
                s = g["stations/" + mem][...]
                np.testing.assert_allclose(s[:, 0], np.linspace(0, length[k], len(s)), atol=1e-12)
                np.testing.assert_allclose(s[-1, 1:], ef[k, 1], atol=1e-9 * scale)
                np.testing.assert_allclose(s[0, 1:], -ef[k, 0], atol=1e-9 * scale)
            R = g["reactions"][...]
            res = np.concatenate([R[:, :3].sum(0), (np.cross(xyz, R[:, :3]) + R[:, 3:]).sum(0)])
            np.testing.assert_allclose(res, g["reaction_sum"][...], atol=1e-9 * np.abs(res).max())
            np.testing.assert_allclose(g["applied"][...] + g["reaction_sum"][...], 0.0,
                                       atol=1e-9 * np.abs(res).max())
        # roof: 12 kN/m over 10 m of beam = 120 kN down (the model file)
        assert f["/static/roof/applied"][2] == pytest.approx(-120.0, rel=1e-12)


def test_buckling_shapes_are_normalised_and_shares_sum_to_one(portal):
    with h5py.File(portal["h5"], "r") as f:
        g = f["/buckling/ULS"]
        fac = g["factors"][...]
        assert np.all(fac > 0) and np.all(np.diff(fac) >= 0)
        # largest translation 1 over every mesh node; the model nodes hold at most that
        tr = g["shapes"][:, :, :3].reshape(len(fac), -1)
        assert np.all(np.abs(tr).max(axis=1) <= 1.0 + 1e-12)
        assert np.all(np.abs(tr).max(axis=1) > 0.0)
        np.testing.assert_allclose(g["member_share"][...].sum(axis=1), 1.0, rtol=1e-9)
        assert set(names(g["kind"])) <= {"global", "member-flexural", "member-torsional"}
        # N0 of ULS: the columns carry the roof load in compression (negative) [model file]
        n0 = g["axial_force"][...]
        assert np.all(n0[:3] < 0)
        assert n0[:3].sum() == pytest.approx(-1.35 * 120.0, rel=1e-9)


# ---- pictures ----------------------------------------------------------------------------

def svg_group(root, gid):
    for g in root.iter(SVG + "g"):
        if g.get("id") == gid:
            return g
    return None


def test_plot_draws_one_curve_per_member_in_well_formed_svg(portal):
    d = portal["dir"]
    for args in (["--mode", "1"], ["--static", "wind", "--view", "xz"],
                 ["--buckling", "ULS", "1", "--view", "plan"], ["--second-order", "ULS"]):
        out = d / "pic.svg"
        p = run("plot", portal["h5"].name, *args, "-o", out.name, cwd=d)
        assert p.returncode == 0, p.stderr
        root = ET.parse(out).getroot()                  # well-formed XML
        assert root.tag == SVG + "svg" and root.get("version") == "1.1"
        shape = svg_group(root, "shape")
        assert shape is not None and len(shape.findall(SVG + "path")) == len(MEMBERS)
        assert len(svg_group(root, "undeformed").findall(SVG + "path")) == len(MEMBERS)
        assert not list(d.glob("*.tmp.*"))
    with h5py.File(portal["h5"], "r") as f:
        f1 = f["/modal/frequencies"][0]
    p = run("plot", portal["h5"].name, "--mode", "1", "-o", "m1.svg", cwd=d)
    text = " ".join(t.text or "" for t in ET.parse(d / "m1.svg").getroot().iter(SVG + "text"))
    assert f"f = {f1:.4g} Hz" in text


def test_plot_draws_a_diagram_per_member(portal):
    d = portal["dir"]
    p = run("plot", portal["h5"].name, "--static", "roof", "--diagram", "My", "--view", "xz",
            "-o", "my.svg", cwd=d)
    assert p.returncode == 0, p.stderr
    root = ET.parse(d / "my.svg").getroot()
    dia = svg_group(root, "diagram")
    outlines = [q for q in dia.findall(SVG + "path") if q.find(SVG + "title") is not None]
    assert [q.find(SVG + "title").text for q in outlines] == MEMBERS
    with h5py.File(portal["h5"], "r") as f:
        my = np.concatenate([f[f"/static/roof/stations/{m}"][:, 5] for m in MEMBERS])
    text = " ".join(t.text or "" for t in root.iter(SVG + "text"))
    assert f"Largest {my.max():.4g} kN*m" in text and f"smallest {my.min():.4g} kN*m" in text


def test_plot_and_show_refuse_bad_requests(portal, tmp_path):
    d = portal["dir"]
    h5 = str(portal["h5"])
    assert run("plot", h5, "--mode", "99", "-o", str(tmp_path / "x.svg")).returncode == 2
    assert run("plot", h5, "--static", "nope", "-o", str(tmp_path / "x.svg")).returncode == 2
    assert run("plot", h5, "--buckling", "wind", "1", "-o", str(tmp_path / "x.svg")).returncode == 2
    assert run("plot", h5, "--mode", "1", "--diagram", "My", "-o", str(tmp_path / "x.svg")).returncode == 2
    assert run("plot", h5, "--mode", "1").returncode == 2           # no -o
    assert not (tmp_path / "x.svg").exists()
    assert run("show", h5, "everything").returncode == 2
    # an HDF5 file that is not ours
    other = tmp_path / "other.h5"
    with h5py.File(other, "w") as f:
        f["x"] = [1.0, 2.0]
    p = run("show", str(other))
    assert p.returncode == 2
    assert "not an eigenframe results file (no format attribute 'eigenframe-results')" in p.stderr
    assert run("show", str(tmp_path / "missing.h5")).returncode == 1
    for cmd in ("show", "plot"):
        p = run(cmd, "--help")
        assert p.returncode == 0 and p.stdout.startswith("usage: eigenframe " + cmd)


CANTILEVER = """\
eigenframe: 1
units: {force: kN, length: m}
materials: {steel: {E: 210e6, G: 81e6}}
sections: {s: {A: 0.01, Iy: 2.0e-4, Iz: 1.0e-4, J: 5.0e-5}}
nodes: {A: [0, 0, 0], B: [3, 0, 0]}
members: {M: {nodes: [A, B], section: s, material: steel%s}}
supports: {A: fixed}
loads: {P: {nodes: {B: {Fz: -10}}}}
"""


@pytest.mark.parametrize("release", ["", ", release: {end: [ry, rz]}"])
def test_plot_shape_follows_the_cantilever_elastic_line(tmp_path, release):
    """A cantilever with a tip load P bends along w(x)/w(L) = xi^2 (3 - xi) / 2, xi = x/L:
    EI w'' = -P (L - x), w(0) = w'(0) = 0 gives w = -P x^2 (3L - x) / (6EI) [D]; the same
    elastic line as Roark's Formulas for Stress and Strain, Table 8.1 case 1a [from memory].
    The drawn curve interpolates the end values by cubic Hermite functions, exact here;
    with the tip rotation released, the zero-curvature end slope 3 w_L / (2L) gives the same
    curve (the tip moment is zero)."""
    h5, _ = run_model(tmp_path, None, CANTILEVER % release)
    p = run("plot", h5.name, "--static", "P", "--view", "xz", "-o", "c.svg", cwd=tmp_path)
    assert p.returncode == 0, p.stderr
    root = ET.parse(tmp_path / "c.svg").getroot()

    def pts(gid):
        d = svg_group(root, gid).find(SVG + "path").get("d")
        return np.array([[float(a), float(b)] for a, b in re.findall(r"[ML]([-\d.]+) ([-\d.]+)", d)])
    base, shape = pts("undeformed"), pts("shape")
    assert len(shape) == 13
    xi = (shape[:, 0] - base[0, 0]) / (base[1, 0] - base[0, 0])
    np.testing.assert_allclose(xi, np.linspace(0, 1, 13), atol=1e-4)
    w = shape[:, 1] - base[0, 1]            # page y grows downwards: the tip goes down
    assert w[-1] > 50.0
    np.testing.assert_allclose(w / w[-1], xi ** 2 * (3 - xi) / 2, atol=2e-4)
