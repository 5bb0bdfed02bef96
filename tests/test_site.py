"""The published site: pages, search index, escaping, offline assets, atomic publishing."""
from __future__ import annotations

import hashlib
import json
import xml.etree.ElementTree as ET
from html.parser import HTMLParser
from pathlib import Path

import markdown
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from builder.site import PublishError, publish_site
from builder.site.escape import md, md_paragraphs, plain
from builder.site.pages import generated_pages, slug
from builder.site.serve import StaticServer
from builder.site.svg import nice_ticks
from site_shops import HOSTILE, HOSTILE_ID, analysis

EXTENSIONS = ["tables", "admonition", "toc"]  # as in site_src/mkdocs.yml


class Markup(HTMLParser):
    """Every tag, attribute, comment and text node of an HTML document."""

    def __init__(self, html: str):
        super().__init__(convert_charrefs=True)
        self.tags: list[tuple[str, dict]] = []
        self.comments: list[str] = []
        self.text: list[str] = []
        self.script_text: list[str] = []
        self._in_script = False
        self.feed(html)

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))
        self._in_script = tag == "script"

    def handle_endtag(self, tag):
        self._in_script = False

    def handle_comment(self, data):
        self.comments.append(data)

    def handle_data(self, data):
        (self.script_text if self._in_script else self.text).append(data)


def live_markup(html: str) -> list[str]:
    """Anything in the document that a record could have smuggled in as markup."""
    doc = Markup(html)
    found = []
    for tag, attrs in doc.tags:
        found += [f"{tag} {k}" for k in attrs if k.startswith("on")]
        found += [f"{tag} {k}={v}" for k, v in attrs.items()
                  if v and v.strip().lower().startswith("javascript:")]
        if tag in ("img", "svg", "b") and "x" == attrs.get("src"):
            found.append(tag)
    found += [c for c in doc.comments if "hidden comment" in c]
    found += [s for s in doc.script_text if "__pwned" in s]
    return found


def page_text(path: Path) -> str:
    """The visible text of an HTML page, whitespace collapsed."""
    return " ".join("".join(Markup(path.read_text()).text).split())


def file_hashes(folder: Path) -> dict[str, str]:
    return {str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest()
            for p in sorted(folder.rglob("*")) if p.is_file()}


@pytest.fixture(scope="module")
def site(tmp_path_factory) -> tuple[object, Path]:
    root = tmp_path_factory.mktemp("shop")
    result = analysis(6, hostile=True, root=str(root / "records"))
    out = root / "site"
    steps = []
    publish_site(result, out, progress=lambda done, total: steps.append((done, total)))
    # a step per published build page (drafts are not published), then mkdocs, then publishing
    total = sum(b.status != "draft" for b in result.shop.builds) + 2
    assert steps == [(done, total) for done in range(1, total + 1)]
    return result, out


def search_docs(out: Path) -> list[dict]:
    return json.loads((out / "search" / "search_index.json").read_text())["docs"]


def search_config(out: Path) -> dict:
    return json.loads((out / "search" / "search_index.json").read_text())["config"]


# --- escaping (Python-Markdown alone, no mkdocs) --------------------------------------------

LINE_START_TRICKS = ["1. one", "- item", "+ item", "* item", "# head #", "===", "---", "***",
                     "!!! note", "> quote", "[TOC]", "![img](x.png)", "<https://example.invalid>",
                     "text\\", "a\\|b", "&lt;b&gt; &amp; \\*", "x\n===\n- item\n1. one\n    code"]


@pytest.mark.parametrize("payload", HOSTILE + LINE_START_TRICKS)
def test_escaped_text_renders_as_the_same_text_and_nothing_else(payload):
    html = markdown.markdown(f"| a |\n|---|\n| {md(payload)} |\n\n# {md(payload)}\n\n"
                             f"{md_paragraphs(payload)}", extensions=EXTENSIONS)
    doc = Markup(html)
    assert {tag for tag, _ in doc.tags} <= {"table", "thead", "tbody", "tr", "th", "td", "h1", "p", "br"}
    assert not doc.comments
    flat = " ".join(payload.split())
    assert "".join(doc.text).count(flat) >= 2  # table cell and heading (and paragraph), verbatim


MARKDOWN_CHARS = list("ab1 .-+#!=*_`[]()<>&|\\{}:/\"'~^\n\t")


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet=st.sampled_from(MARKDOWN_CHARS), min_size=1, max_size=30))
def test_any_mix_of_markdown_characters_stays_plain_text(payload):
    flat = " ".join(payload.split())
    html = markdown.markdown(f"| a |\n|---|\n| {md(payload)} |\n\n# {md(payload)}",
                             extensions=EXTENSIONS)
    doc = Markup(html)
    assert {tag for tag, _ in doc.tags} <= {"table", "thead", "tbody", "tr", "th", "td", "h1"}
    cell_and_heading = [t.strip() for t in doc.text if t.strip()]
    if flat:
        assert cell_and_heading == ["a", flat, flat]


def test_table_cell_stays_one_cell():
    html = markdown.markdown(f"| a | b |\n|---|---|\n| {md('x | y')} | z |", extensions=EXTENSIONS)
    assert html.count("<td>") == 2 and "x | y" in html


def test_plain_site_title_loses_markup_characters():
    assert plain("Shop <b>&</b> \"yard\" {{x}}") == "Shop b/b yard x"


def test_slug_keeps_plain_ids_and_makes_others_file_safe():
    assert slug("HW-0142") == "HW-0142"
    assert slug("../etc/passwd") != slug("etc/passwd")
    assert "/" not in slug("../etc/passwd") and not slug("../x").startswith(".")


def test_nice_ticks_cover_the_range_with_round_steps():
    # 1-2-2.5-5 steps: common practice for chart axes, no source
    assert nice_ticks(0, 37) == [0, 10, 20, 30, 40]
    assert nice_ticks(22.5, 37.5) == [20, 25, 30, 35, 40]
    assert nice_ticks(0.3, 0.9) == [0.2, 0.4, 0.6, 0.8, 1.0]


def test_markdown_is_generated_without_mkdocs():
    paths = dict(generated_pages(analysis(3)))
    assert {"index.md", "reference.md", "builds/index.md", "parts/index.md", "calibration.md",
            "builds/TS-100.md", "builds/TS-100-linkage.svg", "parts/masters/MC-750.md"} <= set(paths)
    for name, text in paths.items():
        if name.endswith(".svg"):
            ET.fromstring(text)  # well-formed


# --- the built site -------------------------------------------------------------------------

def published(result) -> list:
    """The builds the default site shows: the shop rules' publish statuses (no drafts)."""
    return [b for b in result.shop.builds if b.status in result.shop.rules.publish]


def test_every_build_and_part_has_a_page(site):
    result, out = site
    for build in published(result):
        assert (out / "builds" / slug(build.id) / "index.html").is_file()
        assert (out / "builds" / f"{slug(build.id)}-linkage.svg").is_file()
    for kind, parts in result.shop.parts.items():
        for part_id in parts:
            assert (out / "parts" / kind / slug(part_id) / "index.html").is_file()
    for page in ("index.html", "reference/index.html", "builds/index.html", "parts/index.html",
                 "calibration/index.html", "method/index.html", "cautions/index.html"):
        assert (out / page).is_file()


def test_every_build_id_is_in_the_search_index(site):
    result, out = site
    titles = {doc["title"] for doc in search_docs(out) if doc["location"].startswith("builds/")}
    for build in published(result):  # the page's title leads with the id, then the family
        assert any(title.startswith(build.id + " ") for title in titles), build.id


def test_search_index_holds_family_part_bore_and_note_words(site):
    _, out = site
    text = " ".join(d["title"] + " " + d["text"] for d in search_docs(out)
                    if d["location"].startswith("builds/TS-101/"))
    # the index's separator is [\s\-]+: JavaScript's \s takes the no-break space in "0.875 in"
    # as it takes a space (ECMA-262, WhiteSpace), as Python's str.split() does
    assert search_config(out)["separator"] == r"[\s\-]+"
    text = " ".join(text.split())
    for words in ("RB-6", "MC-750", "SL-875", "0.875 in", "pressure bleeder"):
        assert words in text


def test_hostile_text_is_shown_as_text_never_as_markup(site):
    _, out = site
    for page in out.rglob("*.html"):
        assert live_markup(page.read_text()) == [], page
    shown = page_text(out / "builds" / HOSTILE_ID / "index.html")
    for payload in HOSTILE:
        assert " ".join(payload.split()) in shown  # template syntax included, untouched
    for doc in search_docs(out):
        assert "<script" not in doc["text"] and "<img" not in doc["text"]
    entry = next(d for d in search_docs(out) if d["location"] == f"builds/{HOSTILE_ID}/")
    assert "&lt;script&gt;window.__pwned=1&lt;/script&gt;" in entry["text"]


def test_pictures_are_well_formed_svg_with_escaped_labels(site):
    _, out = site
    for picture in out.rglob("*.svg"):
        if "assets" in picture.parts:
            continue
        root = ET.fromstring(picture.read_text())
        assert not any(el.tag.endswith("script") for el in root.iter())
        assert not any(k.startswith("on") for el in root.iter() for k in el.attrib)


def test_site_is_offline_and_nav_stays_small(site):
    _, out = site
    page = (out / "builds" / "TS-100" / "index.html").read_text()
    doc = Markup(page)
    for tag, attrs in doc.tags:
        for key in ("src", "href"):
            value = attrs.get(key) or ""
            if tag in ("script", "link", "img"):
                assert not value.startswith(("http:", "https:", "//")), (tag, value)
    assert "fonts.googleapis" not in page
    assert page.count("md-nav__link") < 40  # builds are not in the nav


def test_method_and_cautions_pages(site):
    _, out = site
    method = page_text(out / "method" / "index.html")
    assert "How similar builds are found" in method and "Norton" in method
    cautions = page_text(out / "cautions" / "index.html")
    for words in ("several hundred psi", "toxic", "strips paint", "creep",
                  "component makers' specifications", "local vehicle codes"):
        assert words in cautions


def test_reference_marks_failed_combinations(site):
    _, out = site
    text = page_text(out / "reference" / "index.html")
    assert "\u2718 failed (1)" in text and "\u2714 verified (1)" in text
    html = (out / "reference" / "index.html").read_text(encoding="utf-8")
    rows = [row for row in html.split("<tr>")[1:] if "\u2718 failed" in row]
    assert rows and rows[0].index("\u2718 failed") < rows[0].index("</td>")  # first cell


def test_failed_build_leaves_the_last_good_site_byte_for_byte(tmp_path):
    result = analysis(2, root=str(tmp_path / "records"))
    out = tmp_path / "site"
    publish_site(result, out)
    before = file_hashes(out)
    broken = tmp_path / "broken_src"
    broken.mkdir()
    (broken / "method.md").write_text("# Method\n\nSee [nowhere](no-such-page.md).\n")
    with pytest.raises(PublishError) as caught:
        publish_site(result, out, site_src=broken)
    assert "no-such-page.md" in str(caught.value)
    assert file_hashes(out) == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["broken_src", "site"]  # no leftovers


def test_shop_site_src_overrides_packaged_files(tmp_path):
    (tmp_path / "site_src").mkdir()
    (tmp_path / "site_src" / "cautions.md").write_text("# Cautions\n\nOur own shop words.\n")
    publish_site(analysis(2, root=str(tmp_path / "records")), tmp_path / "site")
    text = (tmp_path / "site" / "cautions" / "index.html").read_text()
    assert "Our own shop words." in text


def test_refuses_to_replace_a_folder_it_did_not_build(tmp_path):
    out = tmp_path / "mine"
    out.mkdir()
    (out / "keep.txt").write_text("precious")
    with pytest.raises(PublishError, match="not built by fitment"):
        publish_site(analysis(2, root=str(tmp_path / "records")), out)
    assert (out / "keep.txt").read_text() == "precious"


def test_static_server_serves_the_site(site):
    import urllib.request

    _, out = site
    with StaticServer(out) as server:
        assert server.url.startswith("http://127.0.0.1:")
        with urllib.request.urlopen(server.url + "builds/TS-100/") as response:
            assert b"TS-100" in response.read()
