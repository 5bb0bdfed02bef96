"""Hostile record text in a real browser: a build whose every free-text field (and the label
of the part it uses) carries script, event-handler, javascript: link, template and comment
payloads is published through the whole pipeline (YAML -> records -> site build) and must run
nothing and read as plain text, on its page, its part's page and in search results.

Payloads follow the OWASP XSS Filter Evasion Cheat Sheet (script tags, img onerror, svg
onload, javascript: URLs) and Jinja2's template syntax ({{ }}, {% %}, {# #}); Debian's
chromium through playwright, never a browser download.
"""
from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from click.testing import CliRunner

from builder.cli import main
from browsing import search
from builder.site.serve import StaticServer
from clitools import copy_demo_shop

pytestmark = pytest.mark.browser

HOSTILE_ID = "ZZ-0666"
PAYLOADS = [
    "<script>window.__pwned=1;alert(1)</script>",
    '<img src=x onerror="window.__pwned=1;alert(1)">',
    "<svg onload=window.__pwned=1>",
    '<a href="javascript:window.__pwned=1">click</a>',
    "[link](javascript:window.__pwned=1)",
    "{{ 7*7 }} {% raw %} {{ config }} {% endraw %} {# note #}",
    "<!-- hidden comment -->",
    "<iframe src=javascript:alert(1)></iframe>",
]
WORD = "quokkafield"  # a word no page has, for the search box
TEXT_FIELDS = ["technician", "vehicle", "outcome", "gearbox.variant", "slave.bracket",
               "pedal.pushrod", "measured.method"]


def hostile(field: str) -> str:
    return f"{WORD} {field} " + " ".join(PAYLOADS)


def _set(text: str, field: str, value: str) -> str:
    """Set a top-level or one-level-nested scalar in record text, keeping everything else."""
    quoted = json.dumps(value)  # a JSON string is a YAML double-quoted scalar
    if "." not in field:
        new, count = re.subn(rf"^{field}: .*$", lambda _: f"{field}: {quoted}", text, flags=re.M)
        return new if count else text + f"{field}: {quoted}\n"
    section, key = field.split(".")
    block = re.search(rf"^{section}:\n((?:  .*\n)*)", text, re.M)
    body = re.sub(rf"^  {key}: .*\n", "", block[1], flags=re.M) + f"  {key}: {quoted}\n"
    return text[:block.start(1)] + body + text[block.end(1):]


def hostile_shop(base: Path) -> Path:
    copy_demo_shop(base)
    records = base / "records"
    source = next(path for path in sorted((records / "builds").glob("*/*.yaml"))  # master written out
                  if re.search(r"(?m)^master:\n  bore: ", path.read_text()))
    text = source.read_text().replace(f"id: {source.stem}", f"id: {HOSTILE_ID}")
    for field in TEXT_FIELDS:
        text = _set(text, field, hostile(field))
    text = re.sub(r"^notes: \|\n(?:  .*\n?)*", "", text, flags=re.M)
    text += "notes: " + json.dumps(hostile("notes") + "\n\n" + "\n".join(PAYLOADS)) + "\n"
    text = text.replace("master:\n", "master:\n  part: MC-A3\n", 1)
    target = records / "builds" / "2099" / f"{HOSTILE_ID}.yaml"
    target.parent.mkdir()
    target.write_text(text)
    masters = records / "parts" / "masters.yaml"
    masters.write_text(_label(masters.read_text(), "MC-A3", hostile("label")))
    return records


def _label(text: str, part_id: str, label: str) -> str:
    return re.sub(rf"(- id: {part_id}\n    label: ).*", lambda m: m[1] + json.dumps(label), text)


@pytest.fixture(scope="module")
def served(tmp_path_factory):
    base = tmp_path_factory.mktemp("hostile-site")
    records = hostile_shop(base)
    assert CliRunner().invoke(main, ["--records", str(records), "validate"]).exit_code == 0
    result = CliRunner().invoke(main, ["--records", str(records), "site", "build", "--out",
                                       str(base / "site")])
    assert result.exit_code == 0, result.output
    with StaticServer(base / "site") as server:
        yield server.url


def assert_inert(page) -> None:
    page.wait_for_timeout(300)  # give any smuggled handler (img onerror, svg onload) its chance
    assert page.evaluate("typeof window.__pwned") == "undefined"
    live = page.evaluate("""() => [...document.querySelectorAll('article *, .md-search-result *')]
        .filter(e => ['SCRIPT', 'IFRAME'].includes(e.tagName)
                     || [...e.attributes].some(a => a.name.startsWith('on')
                                                || /^\\s*javascript:/i.test(a.value)))
        .map(e => e.outerHTML)""")
    assert live == []
    page.watch.assert_clean()


def flat(text: str) -> str:
    return " ".join(text.split())


def test_build_page_shows_every_payload_as_text(page, served):
    page.goto(f"{served}builds/{HOSTILE_ID}/")
    page.wait_for_load_state("networkidle")
    shown = flat(page.locator("article").inner_text())
    for field in [*TEXT_FIELDS, "notes"]:
        assert flat(hostile(field)) in shown, field
    assert "49" not in shown.split(WORD)[1][:400]  # {{ 7*7 }} was not evaluated
    assert_inert(page)


def test_part_page_shows_the_label_as_text(page, served):
    page.goto(f"{served}parts/masters/MC-A3/")
    page.wait_for_load_state("networkidle")
    assert flat(hostile("label")) in flat(page.locator("article").inner_text())
    assert_inert(page)


def test_search_results_render_payloads_as_text(page, served):
    page.goto(served)
    results = search(page, WORD)
    texts = " ".join(results.all_inner_texts())
    assert HOSTILE_ID in texts or WORD in texts
    assert_inert(page)
    search_box = page.locator("input.md-search__input")
    search_box.fill("")
    search_box.press_sequentially("hidden comment", delay=30)
    page.locator("li.md-search-result__item").first.wait_for(state="visible", timeout=10_000)
    assert_inert(page)
