"""Test set-up shared by every test module.

The documented examples (tests/test_examples.py) are started in a worker process
as soon as the tests are collected, so they run beside the rest of the suite.

In CI (the CI environment variable set) hypothesis draws the same examples on every
run (derandomize), so a green or red run can be reproduced; on a developer's machine
it explores new examples each time.
"""

import os

import pytest
from hypothesis import settings

settings.register_profile("ci", derandomize=True, deadline=None, print_blob=True)
if os.environ.get("CI"):
    settings.load_profile("ci")


def pytest_collection_modifyitems(session, config, items):
    """The examples' tests go last: by then their worker has finished beside the rest."""
    items.sort(key=lambda item: item.originalname == "test_documented_examples_run")


def pytest_collection_finish(session):
    """Start the documented examples (tests/test_examples.py) in a worker process early."""
    picked = [item.callspec.params["source"] for item in session.items
              if item.originalname == "test_documented_examples_run" and hasattr(item, "callspec")]
    if picked and not session.config.option.collectonly:
        import test_examples
        test_examples.start_in_background(picked)


@pytest.fixture(scope="session")
def demo_book(tmp_path_factory):
    """The demo book in all its editions (tablegen demo), built once for the session.

    Read-only: a test that changes files copies the folder first."""
    from tablegen import cli
    out = tmp_path_factory.mktemp("demo-book") / "demo"
    assert cli.main(["demo", "--out", str(out), "--quiet"]) == 0
    return out
