"""How the Python tests find and run the program (shared by every tests/py/test_*.py).

EF_BIN names the binary (scripts/run-tests.sh exports it; default bin/eigenframe, relative
to the current directory or to the repository root).
"""
import os
import subprocess
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


def ef_bin():
    b = Path(os.environ.get("EF_BIN", "bin/eigenframe"))
    if not b.is_absolute():
        b = (Path.cwd() / b) if (Path.cwd() / b).exists() else ROOT / b
    if not b.exists():
        pytest.skip(f"no eigenframe binary at {b} (build it first)")
    return str(b)


def run(*args, cwd=None):
    """Run `eigenframe ARGS...`; returns the CompletedProcess (text, both streams kept)."""
    return subprocess.run([ef_bin(), *args], cwd=cwd, capture_output=True, text=True, timeout=300)
