"""The commands as a user types them: options override the model, exit codes follow the
documented rule (0 success, 1 analysis failure, 2 bad input or usage), bad options are
refused with a message.

Models: examples/platform.yaml (our equipment platform) and
tests/models/good/floor-grid-walking.yaml (our floor bay). Expected values here are
properties of the program's own contract (options override the file), not engineering
check values; those are in the cmocka tests.
"""
import re
import shutil
from pathlib import Path

import pytest

from efrun import ROOT, ef_bin, run  # noqa: E402  (shared helpers)
PLATFORM = ROOT / "examples" / "platform.yaml"
FLOOR = ROOT / "tests" / "models" / "good" / "floor-grid-walking.yaml"


@pytest.fixture()
def work(tmp_path):
    for m in (PLATFORM, FLOOR):
        shutil.copy(m, tmp_path / m.name)
    return tmp_path


def table_rows(text, heading, first_word):
    """Rows of the table after `heading` whose first field is a number."""
    start = text.index(heading)
    rows = []
    for line in text[start:].splitlines()[1:]:
        f = line.split()
        if f and re.fullmatch(r"\d+", f[0]):
            rows.append(f)
        elif rows and not f:
            break
    return rows


def test_help_and_version():
    assert run("--version").stdout.startswith("eigenframe ")
    for cmd in ("check", "run", "modal", "buckling", "second-order", "walking", "machine",
                "show", "plot"):
        p = run(cmd, "--help")
        assert p.returncode == 0 and "usage: eigenframe " + cmd in p.stdout, cmd
    assert run().returncode == 2
    assert run("frobnicate").returncode == 2


def test_modal_options_override_the_model(work):
    p = run("modal", "platform.yaml", "--modes", "3", cwd=work)
    assert p.returncode == 0, p.stderr
    assert "== natural frequencies: 3 modes ==" in p.stdout
    rows = table_rows(p.stdout, "== natural frequencies", "mode")
    assert len(rows) == 3
    f1 = float(rows[0][1])
    p = run("modal", "platform.yaml", "--modes", "2", "--above", str(f1 * 1.01), cwd=work)
    rows = table_rows(p.stdout, "== natural frequencies", "mode")
    assert all(float(r[1]) > f1 for r in rows)
    # no files unless named
    assert not (work / "platform.h5").exists() and not (work / "platform.txt").exists()
    p = run("modal", "platform.yaml", "--modes", "2", "-o", "m.h5", "--report", "m.txt", "-q",
            cwd=work)
    assert p.returncode == 0 and p.stdout == ""
    assert (work / "m.h5").exists() and (work / "m.txt").exists()


def test_bad_options_are_usage_errors(work):
    for args in (("modal", "platform.yaml", "--modes", "zero"),
                 ("modal", "platform.yaml", "--above", "-1"),
                 ("modal", "platform.yaml", "--frobnicate"),
                 ("buckling", "platform.yaml", "--load", "NOPE"),
                 ("second-order", "platform.yaml", "--load", "ULS-1", "--tolerance", "x"),
                 ("walking", "platform.yaml", "--damping", "abc"),
                 ("walking", "platform.yaml", "--receivers", "NOPE"),
                 ("machine", "platform.yaml", "no-such-machine"),
                 ("machine", "platform.yaml", "pump-1", "--hz", "-3"),
                 ("run", "missing.yaml")):
        p = run(*args, cwd=work)
        assert p.returncode == 2, (args, p.returncode, p.stderr)
        assert p.stderr.strip(), args


def test_buckling_and_second_order_commands(work):
    p = run("buckling", "platform.yaml", "--load", "SLS-1", "--modes", "2", "--negative", cwd=work)
    assert p.returncode == 0, p.stderr
    assert "== critical load factors: load 'SLS-1' ==" in p.stdout
    assert "Reversed-load factors" in p.stdout
    rows = table_rows(p.stdout, "== critical load factors", "mode")
    assert len(rows) == 2 and 0 < float(rows[0][1]) <= float(rows[1][1])
    p = run("second-order", "platform.yaml", "--load", "SLS-1", "--chord", cwd=work)
    assert p.returncode == 0, p.stderr
    assert "== second order (P-delta): load 'SLS-1' ==" in p.stdout
    assert "chord terms only" in p.stdout
    assert "1/(1 - 1/alpha_cr)" in p.stdout       # the buckling of the same load ran


def test_load_beyond_critical_exits_1(work):
    """ULS-1 scaled far beyond its critical factor: second order must refuse, exit 1."""
    text = (work / "platform.yaml").read_text()
    text = text.replace("ULS-1: {G: 1.35, live: 1.5, wind_x: 0.9}",
                        "ULS-1: {G: 135.0, live: 150.0, wind_x: 90.0}")
    assert "G: 135.0" in text
    (work / "heavy.yaml").write_text(text)
    p = run("second-order", "heavy.yaml", "--load", "ULS-1", cwd=work)
    assert p.returncode == 1, p.stderr
    assert "beyond the elastic critical load" in p.stderr
    assert "== second order (P-delta)" not in p.stdout


def test_walking_command_overrides_the_model(work):
    p = run("walking", "floor-grid-walking.yaml", cwd=work)
    assert p.returncode == 0, p.stderr
    base = p.stdout
    assert "== floor vibration: walking (footfall) response ==" in base
    # more damping: a smaller response; the damping used is stated
    p = run("walking", "floor-grid-walking.yaml", "--damping", "0.06", "--receivers", "M1",
            cwd=work)
    assert p.returncode == 0, p.stderr
    assert "damping ratio 0.06" in p.stdout

    def largest_r(text):
        return float(re.search(r"Largest R = ([0-9.eE+-]+)", text).group(1))

    p3 = run("walking", "floor-grid-walking.yaml", "--damping", "0.03", "--receivers", "M1",
             cwd=work)
    assert largest_r(p.stdout) < largest_r(p3.stdout)


def test_machine_command_overrides_the_model(work):
    p = run("machine", "platform.yaml", "pump-1", cwd=work)
    assert p.returncode == 0, p.stderr
    assert "== machine 'pump-1'" in p.stdout
    p2 = run("machine", "platform.yaml", "pump-1", "--hz", "30", "--sweep", "0.05", cwd=work)
    assert p2.returncode == 0, p2.stderr
    assert "30" in p2.stdout and p2.stdout != p.stdout


def test_check_reports_mechanism_free_summary(work):
    p = run("check", "platform.yaml", cwd=work)
    assert p.returncode == 0, p.stderr
    assert "model is valid" in p.stdout
    assert re.search(r"mesh: \d+ elements, \d+ nodes, \d+ equations", p.stdout)
