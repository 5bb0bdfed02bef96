"""The built site in a real browser: search, navigation, pictures, sorting, no network, no
script from record text. Uses Debian's chromium (never a browser download)."""
from __future__ import annotations

import os
import re
from pathlib import Path

import pytest

from builder.site import publish_site
from builder.site.serve import StaticServer
from browsing import search
from site_shops import HOSTILE_ID, analysis

pytestmark = pytest.mark.browser


@pytest.fixture(scope="module")
def served(tmp_path_factory):
    root = tmp_path_factory.mktemp("browser")
    out = root / "site"
    publish_site(analysis(6, hostile=True, root=str(root / "records")), out)
    with StaticServer(out) as server:
        yield server.url


def test_search_finds_a_build_and_opens_its_page(page, served):
    page.goto(served)
    results = search(page, "TS-105", expect_in_first="TS-105")
    results.first.locator("a").first.click()
    page.wait_for_url("**/builds/TS-105/**")
    linkage = page.locator('img[src$="TS-105-linkage.svg"]')
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


def test_a_family_code_finds_its_reference_section_then_its_builds(page, served):
    # The search tokenises QX-5 as "qx" and "5" (mkdocs-material's default separator); the
    # reference page's and build pages' `search: boost:` put the family first.
    page.goto(served)
    results = search(page, "QX-5", expect_in_first="QX-5")
    page.wait_for_timeout(500)
    first = results.first
    assert "/reference/" in first.locator("a").first.get_attribute("href")
    assert "QX-5 \u2014 fork tip moves rearward" in first.inner_text()
    following = [" ".join(item.inner_text().split()) for item in results.all()[1:4]]
    assert following and all(re.match(r"TS-\d+ \u2014 QX-5", text) for text in following), following
    page.watch.assert_clean()


def test_reference_and_builds_tables_fit_a_1280_px_window(page, served):
    assert page.viewport_size["width"] == 1280
    for path in ("reference/", "builds/"):
        page.goto(served + path)
        page.wait_for_load_state("networkidle")
        tables = page.evaluate("""() => {
            const edge = Math.min(document.querySelector('article').getBoundingClientRect().right,
                                  window.innerWidth);
            return [...document.querySelectorAll('article table')].map(t => ({
                past: [...t.querySelectorAll('th, td')].filter(c => c.getBoundingClientRect().right > edge + 1).length,
                hidden: Math.max(0, t.scrollWidth - t.clientWidth),
                columns: t.querySelectorAll('th').length}));
        }""")
        assert tables, path
        for table in tables:
            assert table == {"past": 0, "hidden": 0, "columns": table["columns"]}, (path, tables)
    page.watch.assert_clean()


# A figure as the site prints it: a number, one space (or no-break space), its unit.
SPLIT_FIGURES = r"""() => {
    const figure = /[-+]?\d+(?:\.\d+)?[ \u00a0](?:in|mm|lbf|N|psi|kPa|mL|%)(?![\w^])/g;
    const split = [];
    for (const cell of document.querySelectorAll('article td')) {
        const walker = document.createTreeWalker(cell, NodeFilter.SHOW_TEXT);
        for (let node = walker.nextNode(); node; node = walker.nextNode()) {
            for (const match of node.data.matchAll(figure)) {
                const range = document.createRange();
                range.setStart(node, match.index);
                range.setEnd(node, match.index + match[0].length);
                const tops = new Set([...range.getClientRects()].map(r => Math.round(r.top)));
                if (tops.size > 1) split.push(match[0]);
            }
        }
    }
    return split;
}"""


def test_no_figure_in_a_table_is_split_from_its_unit(page, served):
    # In a narrow column a line may break before "(22.2 mm)", never inside "22.2 mm" or
    # "+41.6 %": a line that starts with a bare unit is misread at the bench.
    page.set_viewport_size({"width": 1000, "height": 900})  # narrower columns than 1280 px
    for path in ("reference/", "builds/"):
        page.goto(served + path)
        page.wait_for_load_state("networkidle")
        assert page.evaluate(SPLIT_FIGURES) == [], path
    page.watch.assert_clean()


def test_a_build_page_prints_as_a_bench_sheet_without_navigation(page, served, tmp_path):
    page.goto(served + "builds/TS-101/")
    page.wait_for_load_state("networkidle")
    page.emulate_media(media="print")
    target = Path(os.environ.get("FITMENT_SCREENSHOTS", tmp_path)) / "build-print.png"
    page.screenshot(path=str(target), full_page=True)
    assert target.stat().st_size > 10_000
    for navigation in (".md-header", ".md-sidebar--primary", ".md-sidebar--secondary", ".md-search",
                       ".md-footer", "#similar-builds"):
        assert not page.locator(navigation).first.is_visible(), navigation
    for shown in ("Computed against measured", "Inputs", "Cautions."):
        assert page.locator("article").get_by_text(shown).first.is_visible(), shown
    pdf = page.pdf(format="A4")  # chromium's own print: one or two sheets for the bench
    assert 1 <= len(re.findall(rb"/Type\s*/Page[^s]", pdf)) <= 2
    page.watch.assert_clean()
