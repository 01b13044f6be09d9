"""Shared by the package's tests: where the repository and the CLI are.

The CLI (`burnin`) is the outside reference of several tests: the package
must give its bytes. `cargo xtask test` builds it and sets BURNIN_CLI;
run by hand, the tests look for it in the cargo target folder.
"""

import os
import subprocess
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parents[2]


def _cli() -> Path:
    given = os.environ.get("BURNIN_CLI")
    if given:
        return Path(given)
    target = Path(os.environ.get("CARGO_TARGET_DIR", REPO / "target"))
    for profile in ("debug", "release"):
        p = target / profile / "burnin"
        if p.exists():
            return p
    pytest.skip("no burnin CLI built: run `cargo build` or set BURNIN_CLI (cargo xtask test does)")


@pytest.fixture(scope="session")
def cli():
    path = _cli()

    def run(*args: str, check: bool = True) -> subprocess.CompletedProcess:
        return subprocess.run(
            [str(path), *args], capture_output=True, text=True, check=check, cwd=REPO
        )

    return run


@pytest.fixture(scope="session")
def repo() -> Path:
    return REPO
