"""The footfall picture, `eigenframe plot RESULTS.h5 --walking`, and the /walking group it
is drawn from (docs/results-format.md).

Runs `$EF_BIN run` on tests/models/good/floor-grid-walking.yaml (a beam-grid floor bay of
our own on four pinned corners, five receivers, damping 3 %, limit_R 8), reads /walking with
h5py, parses the walking table of the text report, then draws the picture and parses the SVG
with xml.etree: one marker per receiver, labels carrying the R of the file, colours that
follow R on the scale documented in src/write_svg.c, a legend with the smallest and largest R
and the limit, the title block, the views, and exit status 2 for a file without /walking.
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
MODEL = ROOT / "tests" / "models" / "good" / "floor-grid-walking.yaml"
SVG = "{http://www.w3.org/2000/svg}"

# End stops of the R colour scale, as documented in src/write_svg.c (scale_stops).
SCALE_LOW, SCALE_HIGH = "#f6f0b8", "#5a1d4c"


def plot(h5, out, *extra):
    p = run("plot", str(h5), "--walking", *extra, "-o", str(out))
    assert p.returncode == 0, p.stderr
    return ET.parse(out).getroot()


@pytest.fixture(scope="module")
def floor(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("floor")
    dst = tmp / MODEL.name
    shutil.copy(MODEL, dst)
    p = run("run", dst.name, cwd=tmp)
    assert p.returncode == 0, p.stderr
    h5 = dst.with_suffix(".h5")
    assert h5.exists(), "`eigenframe run` wrote no HDF5 file next to the model"
    with open(MODEL) as fh:
        model = yaml.safe_load(fh)
    with h5py.File(h5, "r") as f:
        g = f["/walking"]
        wk = {
            "receivers": list(g["receivers"].asstr()[...]),
            "R": g["R"][...],
            "a_w_rms": g["a_w_rms"][...],
            "method": list(g["method"].asstr()[...]),
            "n_modes": f["/modal/frequencies"].shape[0],
        }
    svg_path = tmp / "walking.svg"
    root = plot(h5, svg_path)
    return {"h5": h5, "report": p.stdout, "model": model, "dir": tmp, "wk": wk,
            "svg": root, "svg_path": svg_path}


def group(root, gid):
    g = root.find(f".//{SVG}g[@id='{gid}']")
    assert g is not None, f"no <g id='{gid}'>"
    return g


def fmt4(x):
    """R as the text report and the labels print it (C's %.4g; Python's 'g' is the same)."""
    return f"{x:.4g}"


def luminance(hexcolour):
    """Relative luminance of an sRGB colour (IEC 61966-2-1 transfer function, Rec. 709
    weights)."""
    c = np.array([int(hexcolour[i:i + 2], 16) / 255.0 for i in (1, 3, 5)])
    lin = np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)
    return float(lin @ np.array([0.2126, 0.7152, 0.0722]))


def markers(root):
    """name -> (circle element, title text) for every receiver marker."""
    out = {}
    for c in group(root, "receivers").iter(f"{SVG}circle"):
        title = c.find(f"{SVG}title").text
        name = title.split(": R = ")[0]
        assert name not in out, f"two markers for {name}"
        out[name] = (c, title)
    return out


# ---- the /walking group ----------------------------------------------------------------

def test_walking_datasets_and_attributes_have_the_contract_shapes(floor):
    walk = floor["model"]["analyses"]["walking"]
    r = len(walk["receivers"])
    with h5py.File(floor["h5"], "r") as f:
        g = f["/walking"]
        for name in ["receivers", "R", "a_w_rms", "method", "pace_hz", "harmonic", "mode", "walker"]:
            assert name in g, name
            assert g[name].shape == (r,), (name, g[name].shape)
        assert list(g["receivers"].asstr()[...]) == walk["receivers"]   # model order
        assert g["R"].dtype == np.float64 and g["a_w_rms"].dtype == np.float64
        assert np.issubdtype(g["harmonic"].dtype, np.integer)
        assert np.issubdtype(g["mode"].dtype, np.integer)
        a = g.attrs
        for key in ["damping", "walker_weight", "pace_hz", "weighting", "path_length", "modes_used"]:
            assert key in a, key
        # inputs as given in the model file
        assert float(a["damping"]) == walk["damping"]
        assert float(a["path_length"]) == walk["path_length"]
        assert a["weighting"] == walk["weighting"]
        # defaults of docs/model-format.md: pace 1.8-2.2 Hz, walker weight 746 N (here kN)
        assert np.shape(a["pace_hz"]) == (2,)
        assert list(a["pace_hz"]) == [1.8, 2.2]
        assert float(a["walker_weight"]) == pytest.approx(0.746, rel=1e-12)
        n_modes = f["/modal/frequencies"].shape[0]
        assert 1 <= int(a["modes_used"]) <= n_modes
        method = list(g["method"].asstr()[...])
        harmonic, mode, pace = g["harmonic"][...], g["mode"][...], g["pace_hz"][...]
        walkers = list(g["walker"].asstr()[...])
    assert set(method) <= {"resonant", "transient"}
    for i in range(r):
        if method[i] == "resonant":
            assert 1 <= harmonic[i] <= 4
        else:
            assert harmonic[i] == 0
        assert 1 <= mode[i] <= n_modes
        assert 1.8 - 1e-12 <= pace[i] <= 2.2 + 1e-12
        assert walkers[i] in walk["receivers"]      # walkers default to the receivers


def test_R_is_the_weighted_rms_over_the_base_curve(floor):
    # R = a_w,rms / 0.005 m/s^2 (resonant) or v_w,rms / 1.0e-4 m/s (transient): base curve of
    # ISO 10137:2007 Annex C / BS 6472:1992 as quoted in the method note §2(iii) [from memory];
    # the model's length unit is m.
    wk = floor["wk"]
    for R, rms, meth in zip(wk["R"], wk["a_w_rms"], wk["method"]):
        base = 0.005 if meth == "resonant" else 1.0e-4
        assert math.isfinite(R) and R > 0.0
        assert R == pytest.approx(rms / base, rel=1e-12)


def walking_table(report):
    """receiver -> R text from the report's 'Response per receiver' table."""
    lines = report.splitlines()
    start = next(i for i, s in enumerate(lines) if s.startswith("Response per receiver"))
    rule = next(i for i in range(start, len(lines)) if re.fullmatch(r"-{20,}", lines[i]))
    rows = {}
    for s in lines[rule + 1:]:
        if not s.startswith("  "):
            break
        cols = s.split()
        rows[cols[0]] = cols[1]
    return rows, lines


def test_R_in_the_file_equals_the_text_report_walking_table(floor):
    wk = floor["wk"]
    rows, lines = walking_table(floor["report"])
    assert list(rows) == wk["receivers"]
    for name, R in zip(wk["receivers"], wk["R"]):
        assert rows[name] == fmt4(R), name            # the report prints %.4g
    i = int(np.argmax(wk["R"]))
    assert f"Largest R = {fmt4(wk['R'][i])} at receiver '{wk['receivers'][i]}'." in lines


def test_the_model_gives_distinct_R_values_to_draw(floor):
    # Guards the picture tests below: the floor must give receivers with clearly different R,
    # some above and some below the limit, or the colour checks would prove nothing.
    R = floor["wk"]["R"]
    limit = floor["model"]["analyses"]["walking"]["limit_R"]
    assert R.max() > 1.5 * R.min()
    assert (R > limit).any() and (R < limit).any()


# ---- the picture ---------------------------------------------------------------------

def test_plot_walking_draws_one_marker_per_receiver_labelled_with_its_R(floor):
    wk, root = floor["wk"], floor["svg"]
    mk = markers(root)
    assert sorted(mk) == sorted(wk["receivers"])
    assert len(list(group(root, "receivers").iter(f"{SVG}circle"))) == len(wk["receivers"])
    labels = [t.text for t in group(root, "receiver-labels").iter(f"{SVG}text")]
    assert len(labels) == len(wk["receivers"])
    expect = {f"{n}: R = {fmt4(R)}" for n, R in zip(wk["receivers"], wk["R"])}
    assert set(labels) == expect
    for n, R in zip(wk["receivers"], wk["R"]):
        assert mk[n][1].startswith(f"{n}: R = {fmt4(R)}")
        assert re.fullmatch(r"#[0-9a-f]{6}", mk[n][0].get("fill"))


def test_marker_colours_differ_where_R_differs_and_darken_as_R_rises(floor):
    wk = floor["wk"]
    mk = markers(floor["svg"])
    fill = {n: mk[n][0].get("fill") for n in wk["receivers"]}
    R = dict(zip(wk["receivers"], wk["R"]))
    span = max(R.values()) - min(R.values())
    names = wk["receivers"]
    pairs = 0
    for a in names:
        for b in names:
            if R[a] > R[b] + 0.01 * span:       # 1 % of the scale: well above 8-bit steps
                pairs += 1
                assert fill[a] != fill[b], (a, b)
                # the scale's lightness falls as R rises (documented in src/write_svg.c)
                assert luminance(fill[a]) < luminance(fill[b]), (a, b, fill[a], fill[b])
    assert pairs >= 6
    # the scale runs from the smallest R (here below the limit) to the largest
    lo = min(names, key=R.get)
    hi = max(names, key=R.get)
    assert fill[lo] == SCALE_LOW
    assert fill[hi] == SCALE_HIGH


def test_markers_are_drawn_in_ascending_R_so_the_largest_lies_on_top(floor):
    R = dict(zip(floor["wk"]["receivers"], floor["wk"]["R"]))
    drawn = [c.find(f"{SVG}title").text.split(": R = ")[0]
             for c in group(floor["svg"], "receivers").iter(f"{SVG}circle")]
    assert [R[n] for n in drawn] == sorted(R.values())


def test_markers_above_the_limit_have_the_heavy_outline(floor):
    wk = floor["wk"]
    limit = floor["model"]["analyses"]["walking"]["limit_R"]
    mk = markers(floor["svg"])
    above = [float(mk[n][0].get("stroke-width")) for n, R in zip(wk["receivers"], wk["R"]) if R > limit]
    below = [float(mk[n][0].get("stroke-width")) for n, R in zip(wk["receivers"], wk["R"]) if R <= limit]
    assert above and below
    assert min(above) > max(below)


def test_legend_shows_the_scale_smallest_largest_and_limit(floor):
    wk, root = floor["wk"], floor["svg"]
    limit = floor["model"]["analyses"]["walking"]["limit_R"]
    leg = group(root, "legend")
    texts = [t.text for t in leg.iter(f"{SVG}text")]
    i, j = int(np.argmax(wk["R"])), int(np.argmin(wk["R"]))
    assert f"{fmt4(wk['R'][i])}  largest, {wk['receivers'][i]}" in texts
    assert f"{fmt4(wk['R'][j])}  smallest, {wk['receivers'][j]}" in texts
    assert f"{fmt4(limit)}  your limit" in texts
    stops = [s.get("stop-color") for s in leg.iter(f"{SVG}stop")]
    assert stops[0] == SCALE_LOW and stops[-1] == SCALE_HIGH and len(stops) >= 2
    # the limit is drawn on a linear scale from the smallest R (bottom) to the largest (top):
    # here the smallest R is below the limit, so the scale is [min R, max R]
    bar = next(r for r in leg.iter(f"{SVG}rect") if r.get("fill", "").startswith("url("))
    top, h = float(bar.get("y")), float(bar.get("height"))
    dashed = [p for p in leg.iter(f"{SVG}path") if p.get("stroke-dasharray")]
    assert len(dashed) == 1
    y = float(re.match(r"M\s*[-\d.]+\s+([-\d.]+)", dashed[0].get("d")).group(1))
    lo, hi = wk["R"].min(), wk["R"].max()
    assert y == pytest.approx(top + h - (limit - lo) / (hi - lo) * h, abs=0.02)


def test_title_block_states_model_method_inputs_and_units(floor):
    text = " | ".join(t.text for t in group(floor["svg"], "title-block").iter(f"{SVG}text"))
    for needle in ["Office floor bay on a beam grid", "footfall response factor R",
                   "damping ratio 0.03 of critical", "pace frequency 1.8-2.2 Hz",
                   "Weighting Wb", "walking path 6 m", "Governing method: resonant at 5",
                   "Your limit R = 8", "force kN, length m", "view: plan"]:
        assert needle in text, needle


def test_default_view_is_plan_looking_along_gravity(floor):
    # gravity is -Z (the model default), so plan shows global X to the right and Y upwards
    # (SVG y grows downwards); the picture with --view plan is the same file
    mk = markers(floor["svg"])
    xyz = floor["model"]["nodes"]
    c = {n: (float(e.get("cx")), float(e.get("cy"))) for n, (e, _) in mk.items()}
    assert c["M1"][0] == pytest.approx(c["A1"][0], abs=0.01)       # both at x = 3 m
    assert c["E0"][1] == pytest.approx(c["M1"][1], abs=0.01)       # both at y = 3 m
    names = list(c)
    for a in names:
        for b in names:
            if xyz[a][0] > xyz[b][0] + 1e-9:
                assert c[a][0] > c[b][0]
            if xyz[a][1] > xyz[b][1] + 1e-9:
                assert c[a][1] < c[b][1]
    # equal scale in both directions: 3 m along x and 3 m along y give the same length
    assert c["M1"][0] - c["E0"][0] == pytest.approx(c["A1"][1] - c["M1"][1], rel=1e-6)
    out = floor["dir"] / "walking_plan.svg"
    plot(floor["h5"], out, "--view", "plan")
    assert out.read_bytes() == floor["svg_path"].read_bytes()


@pytest.mark.parametrize("view", ["iso", "xz", "yz"])
def test_every_view_draws_every_receiver(floor, view):
    out = floor["dir"] / f"walking_{view}.svg"
    root = plot(floor["h5"], out, "--view", view)
    assert sorted(markers(root)) == sorted(floor["wk"]["receivers"])
    assert len(list(group(root, "receiver-labels").iter(f"{SVG}text"))) == len(floor["wk"]["R"])
    assert not list(floor["dir"].glob("*.tmp.*"))          # written atomically, nothing left


def test_plot_walking_without_walking_results_exits_2(floor):
    h5 = floor["dir"] / "no_walking.h5"
    shutil.copy(floor["h5"], h5)
    with h5py.File(h5, "r+") as f:
        del f["/walking"]
    out = floor["dir"] / "no_walking.svg"
    p = run("plot", str(h5), "--walking", "-o", str(out))
    assert p.returncode == 2
    assert "no walking" in p.stderr and "/walking" in p.stderr
    assert not out.exists()


def test_walking_with_a_diagram_is_a_usage_error(floor):
    out = floor["dir"] / "bad.svg"
    p = run("plot", str(floor["h5"]), "--walking", "--diagram", "My", "-o", str(out))
    assert p.returncode == 2
    assert not out.exists()
