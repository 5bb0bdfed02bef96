"""Driving Debian's chromium through playwright for the browser tests (no tests here).

Never a browser download: the executable is /usr/bin/chromium (Debian package `chromium`).
"""
from __future__ import annotations

import os
import shutil
from urllib.parse import urlparse

CHROMIUM = "/usr/bin/chromium"
ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
        "--disable-component-update", "--no-first-run", "--disable-sync"]


def chromium_missing() -> str | None:
    """Why the browser tests cannot run here, or None when chromium is installed."""
    if os.path.exists(CHROMIUM) and shutil.which("chromium"):
        return None
    return f"{CHROMIUM} not installed (apt-get install chromium)"


class Watch:
    """Page errors, dialogs and every request that tried to leave 127.0.0.1."""

    def __init__(self, page):
        self.errors: list[str] = []
        self.dialogs: list[str] = []
        self.outside: list[str] = []
        page.on("pageerror", lambda error: self.errors.append(str(error)))
        page.on("dialog", self._dialog)
        page.route("**/*", self._route)

    def _dialog(self, dialog):
        self.dialogs.append(dialog.message)
        dialog.dismiss()

    def _route(self, route):
        if urlparse(route.request.url).hostname == "127.0.0.1":
            route.continue_()
        else:
            self.outside.append(route.request.url)
            route.abort()

    def assert_clean(self):
        assert self.errors == []
        assert self.dialogs == []
        assert self.outside == []


def search(page, words: str, expect_in_first: str | None = None):
    """Type into the search box key by key; results refresh on each key-up."""
    from playwright.sync_api import expect

    page.locator("label.md-search__icon, input.md-search__input").first.click()
    page.locator("input.md-search__input").press_sequentially(words, delay=30)
    results = page.locator("li.md-search-result__item")
    results.first.wait_for(state="visible", timeout=10_000)
    if expect_in_first:  # wait for the results of the whole query, not of a prefix
        expect(results.first).to_contain_text(expect_in_first, timeout=10_000)
    return results
