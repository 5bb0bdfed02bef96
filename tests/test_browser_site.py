"""The built site in a real browser: search, navigation, pictures, sorting, no network, no
script from record text. Uses Debian's chromium (never a browser download)."""
from __future__ import annotations

import os
from pathlib import Path

import pytest

from builder.site import build_site
from builder.site.serve import StaticServer
from browsing import search
from site_shops import HOSTILE_ID, analysis

pytestmark = pytest.mark.browser


@pytest.fixture(scope="module")
def served(tmp_path_factory):
    root = tmp_path_factory.mktemp("browser")
    out = root / "site"
    build_site(analysis(6, hostile=True, root=str(root / "records")), out)
    with StaticServer(out) as server:
        yield server.url


def test_search_finds_a_build_and_opens_its_page(page, served):
    page.goto(served)
    results = search(page, "TS-103", expect_in_first="TS-103")
    results.first.locator("a").first.click()
    page.wait_for_url("**/builds/TS-103/**")
    linkage = page.locator('img[src$="TS-103-linkage.svg"]')
    linkage.scroll_into_view_if_needed()
    assert linkage.is_visible()
    assert page.evaluate("img => img.naturalWidth", linkage.element_handle()) > 0
    page.watch.assert_clean()


def test_search_finds_words_from_the_notes(page, served):
    page.goto(served)
    results = search(page, "bleeder")
    assert results.count() >= 1
    page.watch.assert_clean()


def test_table_sorts_on_click(page, served):
    page.goto(served + "builds/")
    heading = page.locator("article table th", has_text="Build").first
    first_cell = page.locator("article table tbody tr td:first-child").first
    heading.click()
    assert heading.get_attribute("aria-sort") == "ascending"
    ascending = first_cell.inner_text()
    heading.click()
    assert heading.get_attribute("aria-sort") == "descending"
    assert first_cell.inner_text() != ascending
    cells = page.locator("article table tbody tr td:first-child").all_inner_texts()
    assert cells == sorted(cells, key=str.lower, reverse=True)
    page.watch.assert_clean()


def test_hostile_record_text_runs_no_script(page, served):
    page.goto(served + f"builds/{HOSTILE_ID}/")
    page.wait_for_load_state("networkidle")
    assert "<script>window.__pwned=1</script>" in page.locator("article").inner_text()
    assert page.evaluate("typeof window.__pwned") == "undefined"
    search(page, "hidden comment", expect_in_first=HOSTILE_ID)
    page.wait_for_timeout(300)  # results render as HTML: give any smuggled handler its chance
    assert page.evaluate("typeof window.__pwned") == "undefined"
    page.watch.assert_clean()


def test_screenshots_of_home_and_a_build_page(page, served, tmp_path):
    """Pictures for a person to look at (kept under the test's tmp_path)."""
    for name, path in (("home", ""), ("build", "builds/TS-101/")):
        page.goto(served + path)
        page.wait_for_load_state("networkidle")
        target = Path(os.environ.get("FITMENT_SCREENSHOTS", tmp_path)) / f"{name}.png"
        page.screenshot(path=str(target), full_page=True)
        assert target.stat().st_size > 10_000
    page.watch.assert_clean()
