"""Shared fixtures. Makers of invented records live in tests/factories.py,
tests/history_factories.py and tests/site_shops.py; browser helpers in tests/browsing.py.
No test module imports another."""
from __future__ import annotations

import os

import pytest

from browsing import ARGS, CHROMIUM, Watch, chromium_missing


def pytest_addoption(parser):
    parser.addoption("--update-golden", action="store_true",
                     help="rewrite tests/golden/* from the current output (then read the diff)")


@pytest.fixture
def update_golden(request) -> bool:
    return request.config.getoption("--update-golden")


@pytest.fixture(scope="session")
def browser():
    """Debian's chromium through playwright; skipped locally without it, a failure in CI."""
    missing = chromium_missing()
    if missing:
        if os.environ.get("CI") == "true":
            pytest.fail(f"{missing} and CI=true: browser tests must run in CI", pytrace=False)
        pytest.skip(f"{missing}; browser tests skipped")
    sync_api = pytest.importorskip("playwright.sync_api")
    with sync_api.sync_playwright() as playwright:
        chromium = playwright.chromium.launch(executable_path=CHROMIUM, args=ARGS)
        yield chromium
        chromium.close()


@pytest.fixture
def page(browser):
    """A 1280 x 900 page that records errors, dialogs and requests leaving 127.0.0.1."""
    context = browser.new_context(viewport={"width": 1280, "height": 900})
    page = context.new_page()
    page.watch = Watch(page)
    yield page
    context.close()
