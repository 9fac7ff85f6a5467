"""Shared fixtures: the built program, the source tree, the sample corpus."""

import os
import subprocess
import sys

import pytest

SOURCE = os.environ.get("KINDRED_SOURCE_DIR",
                        os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))
BINARY = os.environ.get("KINDRED_BINARY", os.path.join(SOURCE, "build", "kindred"))
sys.path.insert(0, os.path.join(SOURCE, "tests", "reference"))


@pytest.fixture(scope="session")
def source():
    return SOURCE


@pytest.fixture(scope="session")
def archive():
    return os.path.join(SOURCE, "sample_corpus", "archive.jsonl")


def run_cli(*args, check=True):
    """Runs the built kindred program; returns the completed process."""
    done = subprocess.run([BINARY, *args], capture_output=True)
    if check and done.returncode != 0:
        raise AssertionError(f"kindred {' '.join(args)}: exit {done.returncode}: "
                             f"{done.stderr.decode()}")
    return done
