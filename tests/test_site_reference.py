"""What the published site shows: only the statuses the shop publishes (drafts only in an
internal copy), a fitment reference a customer can read, a search index without the
cross-reference tables, and plain words.

Outside references: NIST SP 811 Appendix B.8 (1 in = 25.4 mm) for the bores shown; the lever
rule (mechanical advantage = effort arm / load arm; any statics text, e.g. Meriam and Kraige,
Engineering Mechanics: Statics) for the pedal ratio; mkdocs-material's documentation,
"Setting up site search" (per-page `search: boost:` front matter; `data-search-exclude`
keeps a section or block out of search_index.json). Invented shops only (tests/site_shops.py).
"""
from __future__ import annotations

import dataclasses
import json
import re
import shutil
from html.parser import HTMLParser
from pathlib import Path

import pytest
from click.testing import CliRunner

from builder.cli import main
from builder.history import analyse
from builder.site import publish_site
from factories import POUND_FORCE
from site_shops import shop

ROOT = Path(__file__).resolve().parents[1]
DRAFT = "TS-103"  # site_shops.shop(): every fourth build from TS-103 on is a draft


class Text(HTMLParser):
    def __init__(self, html: str):
        super().__init__(convert_charrefs=True)
        self.parts: list[str] = []
        self.feed(html)

    def handle_data(self, data):
        self.parts.append(data)


def text_of(path: Path) -> str:
    return " ".join("".join(Text(path.read_text(encoding="utf-8")).parts).split())


def index_of(out: Path) -> list[dict]:
    return json.loads((out / "search" / "search_index.json").read_text())["docs"]


@pytest.fixture(scope="module")
def sites(tmp_path_factory):
    """The same shop published twice: the public site and an internal copy with drafts."""
    root = tmp_path_factory.mktemp("publish")
    result = analyse(shop(8, root=str(root / "records")))
    assert any(b.status == "draft" for b in result.shop.builds)
    public, internal = root / "public", root / "internal"
    publish_site(result, public)
    publish_site(result, internal, include_drafts=True)
    return result, public, internal


# --- drafts and the publish rule -------------------------------------------------------------

def test_a_draft_is_not_on_the_public_site_nor_in_its_search_index(sites):
    result, public, _ = sites
    assert result.builds[DRAFT].status == "draft"
    assert not (public / "builds" / DRAFT).exists()
    for doc in index_of(public):
        assert DRAFT not in doc["location"] + doc["title"] + doc["text"], doc["location"]
    for page in public.rglob("*.html"):
        assert DRAFT not in page.read_text(encoding="utf-8"), page
    assert "Internal copy" not in text_of(public / "index.html")


def test_a_draft_is_in_the_internal_copy_and_its_search_index(sites):
    result, _, internal = sites
    assert (internal / "builds" / DRAFT / "index.html").is_file()
    assert any(doc["location"].startswith(f"builds/{DRAFT}/") for doc in index_of(internal))
    home = text_of(internal / "index.html")
    drafts = sum(b.status == "draft" for b in result.shop.builds)
    assert f"Internal copy: includes {drafts} draft builds" in home
    assert DRAFT in text_of(internal / "builds" / "index.html")
    assert "A proposal, not a finished build" in text_of(internal / "builds" / DRAFT / "index.html")


def test_the_publish_rule_decides_which_statuses_are_shown(tmp_path):
    only_verified = shop(8, root=str(tmp_path / "records"))
    only_verified = dataclasses.replace(only_verified, rules=dataclasses.replace(
        only_verified.rules, publish=("verified",)))
    result = analyse(only_verified)
    out = tmp_path / "site"
    publish_site(result, out)  # strict mkdocs: no link (similar builds, where used) to a page left out
    shown = {p.name for p in (out / "builds").iterdir() if p.is_dir()}
    assert shown == {b.id for b in result.shop.builds if b.status == "verified"}
    rows = reference_rows(out)
    assert rows and all("\u2714 verified" in row and "failed" not in row for row in rows)


def test_cli_include_drafts_on_the_demo_shop(tmp_path):
    shutil.copytree(ROOT / "records", tmp_path / "records")
    records = tmp_path / "records"
    drafts = {p.stem for p in records.glob("builds/**/*.yaml") if "status: draft" in p.read_text()}
    assert drafts
    pages = {}
    for name, extra in (("public", []), ("internal", ["--include-drafts"])):
        result = CliRunner().invoke(main, ["--records", str(records), "site", "build", "--out",
                                           str(tmp_path / name), *extra])
        assert result.exit_code == 0, result.output
        pages[name] = {p.name for p in (tmp_path / name / "builds").iterdir() if p.is_dir()}
    assert pages["internal"] - pages["public"] == drafts
    assert "drafts included" in result.output


# --- the fitment reference -------------------------------------------------------------------

def reference_rows(out: Path) -> list[str]:
    html = (out / "reference" / "index.html").read_text(encoding="utf-8")
    return [" ".join(re.sub(r"<[^>]+>", " ", row).split()) for row in html.split("<tr>")[2:]]


def test_every_reference_row_shows_bores_and_pedal_ratio_with_catalogue_parts(sites):
    result, public, _ = sites
    html = (public / "reference" / "index.html").read_text(encoding="utf-8")
    rows = [row for row in reference_rows(public) if "verified" in row]
    assert rows
    for row in rows:  # site_shops: master MC-750 (3/4 in), slave SL-875 (7/8 in), catalogue parts
        assert "0.75 in (19.1 mm)" in row and "MC-750" in row  # 0.75 x 25.4 = 19.05 mm
        assert "0.875 in (22.2 mm)" in row and "SL-875" in row  # 0.875 x 25.4 = 22.225 mm
    # lever rule: the pedal ratio is the pad arm over the clevis arm, 11.25 in / 2.10 in
    assert f"{11.25 / 2.10:.2f} : 1" in " ".join(rows)
    assert 'href="../parts/masters/MC-750/"' in html and 'href="../builds/TS-100/"' in html


def test_a_failed_row_says_why(sites):
    result, public, _ = sites
    failed = [row for row in reference_rows(public) if "\u2718 failed" in row]
    rejected = [b for b in result.shop.builds if b.status == "rejected"]
    assert failed and rejected
    for build in rejected:
        row = next(r for r in failed if build.id in r)
        assert f"{build.id}: " in row and build.outcome in row  # what the car did
        for flag in result.sizings[build.id].flags:  # and what the tool found
            assert flag.code.replace("-", " ").split()[0] in row


def test_a_verified_build_the_tool_flags_is_marked(tmp_path):
    heavy = shop(6, root=str(tmp_path / "records"))  # a band no pedal meets: all flagged
    heavy = dataclasses.replace(heavy, rules=dataclasses.replace(
        heavy.rules, effort_band=(5 * POUND_FORCE, 8 * POUND_FORCE)))
    result = analyse(heavy)
    out = tmp_path / "site"
    publish_site(result, out)
    verified = [b for b in result.shop.builds if b.status == "verified"]
    assert all(result.sizings[b.id].flags for b in verified)
    rows = [row for row in reference_rows(out) if "\u2714 verified" in row]
    assert rows and all("flagged \u26a0" in row and "pedal heavy" in row for row in rows)


# --- search: boosts and what stays out of the index ------------------------------------------

def test_cross_reference_tables_stay_out_of_the_search_index(sites):
    _, public, _ = sites
    docs = index_of(public)
    for doc in docs:
        assert not doc["location"].endswith(("#similar-builds", "#where-used", "#latest-builds"))
        if doc["location"].startswith("builds/"):
            assert "What differs" not in doc["text"]
    build_page = (public / "builds" / "TS-100" / "index.html").read_text(encoding="utf-8")
    assert "What differs" in build_page  # on the page, not in the index
    part_page = text_of(public / "parts" / "masters" / "MC-750" / "index.html")
    assert "Where used" in part_page and "TS-100" in part_page
    assert not any("TS-100" in d["text"] for d in docs if d["location"].startswith("parts/"))


def test_family_sections_and_builds_weigh_more_in_search(sites):
    _, public, _ = sites
    boosts = {}
    for doc in index_of(public):
        place = doc["location"].split("#")[0]
        kind = "build" if re.fullmatch(r"builds/[^/]+/", place) else place.split("/")[0]
        boosts.setdefault(kind, set()).add(doc.get("boost"))
    assert boosts["reference"] == {8} and boosts["build"] == {2}
    assert boosts["parts"] == {None} and boosts["builds"] == {None}  # the index of builds
    sections = [d for d in index_of(public) if d["location"].startswith("reference/#")]
    assert {d["title"] for d in sections} >= {"QX-5 \u2014 fork tip moves rearward"}


# --- words ----------------------------------------------------------------------------------

def test_pages_speak_plain_words(sites):
    _, public, internal = sites
    parts = text_of(public / "parts" / "index.html")
    for plural in ("Master cylinders", "Slave cylinders", "Gearboxes"):
        assert plural in parts
    for out in (public, internal):
        for page in out.rglob("*.html"):
            words = text_of(page)
            assert not re.search(r"Clutchs|Gearboxs|assemblys|braided_ptfe|fork_tip_moves", words), page
    assert "braided PTFE" in text_of(public / "builds" / "TS-100" / "index.html")


def test_record_text_in_a_family_heading_stays_text(tmp_path):
    from site_shops import HOSTILE, HOSTILE_TEXT, build

    hostile = shop(2, root=str(tmp_path / "records"))
    hostile = dataclasses.replace(hostile, builds=hostile.builds + (
        build(9, text=HOSTILE_TEXT + " { .evil #x }", build_id="ZZ-667", status="verified"),))
    out = tmp_path / "site"
    publish_site(analyse(hostile), out)
    html = (out / "reference" / "index.html").read_text(encoding="utf-8")
    assert 'class="evil"' not in html and 'id="x"' not in html
    assert "<script>window.__pwned" not in html and "onerror=" not in html.replace("onerror=&quot;", "")
    shown = text_of(out / "reference" / "index.html")
    assert " ".join(HOSTILE[0].split()) in shown  # the family code, shown as written
