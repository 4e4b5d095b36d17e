"""Shared fixtures: the command-line binary the module is checked against."""

import os
import subprocess
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture(scope="session")
def cli() -> Path:
    """The release binary (LAGFOLD_BIN, else target/release/lagfold, built if missing)."""
    binary = Path(os.environ.get("LAGFOLD_BIN", ROOT / "target" / "release" / "lagfold"))
    if not binary.exists():
        subprocess.run(["cargo", "build", "--release", "--locked"], cwd=ROOT, check=True)
    return binary


def run_cli(binary: Path, *args: str, expect: int = 0) -> subprocess.CompletedProcess:
    """Runs the command line; asserts its exit code."""
    done = subprocess.run([str(binary), *args], capture_output=True, text=True)
    assert done.returncode == expect, done.stderr
    return done
