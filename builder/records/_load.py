"""Loading a records folder: shop rules, parts catalogue and builds, every problem located.

Each file takes the fast path first (libyaml, compiled schema, cached units) and is loaded
again carefully, with positions, only when something in it needs reporting.
"""
from __future__ import annotations

import dataclasses
import errno
import os
import unicodedata
from collections.abc import Callable, Iterable
from pathlib import Path

from builder import model
from builder.bulk import collector_paused
from builder.fields import END_FIELDS, FIELDS, SECTIONS, TEXT, TOP_FIELDS
from builder.presentation import placeholder_message, unknown_family_message
from builder.problems import PLACEHOLDER, InputError, Problem, nearest
from builder.records import convert as f
from builder.records._schema import dotted, is_valid_fast, schema_problems
from builder.records._yaml import NeedsCare, careful_load, fast_load, read_text

YAML_SUFFIXES = (".yaml", ".yml")
_MEASURED_STATUSES = ("measured", "verified")
# from the field table: a build's free-text fields, and the sections every build has
_FREE_TEXT = tuple(field.key for field in TOP_FIELDS + END_FIELDS if field.kind == TEXT)
_NEEDED_SECTIONS = tuple(section.name for section in SECTIONS if not section.optional)
Progress = Callable[[int, int], None]


def _load(path: Path, schema: str, convert: Callable[[dict, f.ProblemCollector], object],
          root: Path | None = None) -> tuple[object, list[Problem]]:
    """(converted object, []) or (None, every problem in the file). `root`: the records
    folder; a file in it that is a link to somewhere outside it is refused unread."""
    shown = str(path)
    if root is not None:
        escape = _link_out_of_records(path, root)
        if escape is not None:
            return None, [escape]
    text, unreadable = read_text(path)
    if unreadable:
        return None, [Problem(shown, *unreadable[:2], "file", unreadable[2])]
    return _load_text(text, shown, schema, convert)


def _load_text(text: str, shown: str, schema: str, convert: Callable[[dict, f.ProblemCollector], object]
               ) -> tuple[object, list[Problem]]:
    """As _load, for a document already read; `shown` names it in problems."""
    try:
        data = fast_load(text)
        if is_valid_fast(schema, data):
            return convert(data, f.ProblemCollector(shown)), []
    except NeedsCare:
        pass
    doc = careful_load(text)
    report = f.ProblemCollector(shown, doc)
    report.problems.extend(Problem(shown, line, col, dotted(where), message) for where, line, col, message in doc.problems)
    if doc.data is None and report.problems:  # unreadable; a document of just `null` goes on
        return None, report.problems
    for where, unknown_key, field, message in schema_problems(schema, doc.data):
        code = None
        if not unknown_key:
            report.bad.append(where)
            found = _value_at(doc.data, where)
            if f.left_to_fill(found, field):  # a template's `xx lbf`: say what to fill in
                label = FIELDS[field].label if field in FIELDS else field
                message, code = placeholder_message(label, found), PLACEHOLDER
            else:
                message += f.accepted(f.range_key(schema, where, doc.data))
        report(where, message, at_key=unknown_key, field=field, code=code)
    result = None if report.blocked(()) else convert(doc.data, report)
    return (None, report.problems) if report.problems else (result, [])


def _value_at(data: object, where: tuple) -> object:
    """The value at a schema error's path in a document, or None where the path breaks off."""
    for step in where:
        try:
            data = data[step]
        except (KeyError, IndexError, TypeError):
            return None
    return data


def _convert_rules(data: dict, report: f.ProblemCollector) -> model.ShopRules | None:
    def get(*where: str):
        value = data
        for step in where:
            value = value.get(step) if isinstance(value, dict) else None
        key = ".".join(("shop", *where))
        if value is None:  # left out: the field table's default, if it has one
            value = FIELDS[key].default
        if value is None or not report.clean(where):
            return None
        if FIELDS[key].alternative is not None:  # one figure, or points / one per kind
            return f.points_or_quantity(value, key, report, where)
        return f.quantity(value, key, report, where)

    band = (get("effort_band", "low"), get("effort_band", "high"))
    hoses = {hose: get("hose_expansion", hose) for hose in model.HOSE_KINDS}
    if None not in band and band[0] >= band[1]:
        report(("effort_band",), "low must be below high")
    target = get("target_effort") if "target_effort" in data else None
    if target is not None and None not in band and not band[0] <= target <= band[1]:
        report(("target_effort",), "must lie inside the effort band (low to high)")
    values = dict(
        effort_band=band,
        min_travel_margin=get("min_travel_margin"),
        latest_release_point=get("latest_release_point"),
        default_efficiency=get("default_efficiency"),
        hose_expansion=hoses,
        fluid_bulk_modulus=get("fluid_bulk_modulus"),
        line_bore=get("line_bore"),
        max_pushrod_angle=get("max_pushrod_angle"),
        master_dead_stroke=get("master_dead_stroke"),
        pushrod_free_play=get("pushrod_free_play"),
    )
    optional = dict(max_travel_margin=get("max_travel_margin"))
    if report.problems or None in band or None in hoses.values() or None in values.values():
        return None
    return model.ShopRules(site_title=str(data["site_title"]), display_units=data["display_units"],
                           target_effort=target,
                           families=tuple(f.text(code) for code in data.get("families") or ()),
                           publish=tuple(data.get("publish", model.PUBLISHABLE)),
                           **values, **optional)


def parse_rules(text: str, shown: str = "shop.yaml") -> model.ShopRules:
    """Shop rules from the text of a shop.yaml; InputError with every problem."""
    rules, problems = _load_text(text, shown, "shop", _convert_rules)
    if problems:
        raise InputError(problems)
    return rules


def parse_catalogue(texts: dict[str, str]) -> dict[str, dict[str, model.Part]]:
    """kind -> id -> Part from the texts of parts files, by kind; InputError with every problem."""
    catalogue: dict[str, dict[str, model.Part]] = {kind: {} for kind in model.PART_KINDS}
    taken: dict[str, str] = {}
    problems: list[Problem] = []
    for kind, text in texts.items():
        path = Path("parts", f"{kind}.yaml")
        parts, found = _load_text(text, str(path), "parts", _parts_converter(path, taken))
        problems += found
        for part in parts or ():
            catalogue[part.kind][part.id] = part
            taken[part.id] = str(path)
    if problems:
        raise InputError(problems)
    return catalogue


def parse_build(text: str, catalogue: dict[str, dict[str, model.Part]], shown: str,
                stem: str | None = None, rules: model.ShopRules | None = None) -> model.Build:
    """One build from its text; `stem`, when given, is the file name its id must equal. Its
    gearbox family must be a catalogue gearbox's or, with `rules`, one of the shop's
    `families`. InputError with every problem."""
    families = _catalogue_families(catalogue) | frozenset(rules.families if rules else ())
    build, problems = _load_text(text, shown, "build", _build_converter(catalogue, stem, families))
    if problems:
        raise InputError(problems)
    return build


def _rules(root: Path) -> tuple[model.ShopRules | None, list[Problem]]:
    """shop.yaml, refused unread when it is a link leading out of the records folder."""
    return _load(root / "shop.yaml", "shop", _convert_rules, root)


def load_rules(records_dir: str | os.PathLike) -> model.ShopRules:
    """The shop rules from records/shop.yaml; InputError with every problem."""
    rules, problems = _rules(Path(records_dir))
    if problems:
        raise InputError(problems)
    return rules


def _parts_converter(path: Path, taken: dict[str, str]) -> Callable[[dict, f.ProblemCollector], list[model.Part]]:
    """Converts one parts file; `taken` maps part ids already loaded to their file."""

    def convert(data: dict, report: f.ProblemCollector) -> list[model.Part]:
        if report.blocked(("kind",)) or report.blocked(("parts",)):
            return []
        kind = data["kind"]
        if kind != path.stem:
            report(("kind",), f"kind {kind!r} must equal the file name {path.stem!r}")
        section = f.SECTION_OF_KIND[kind]
        here: dict[str, int] = {}
        parts = []
        for index, raw in enumerate(data["parts"]):
            where = ("parts", index)
            if report.blocked(where) or report.blocked(where + ("id",)) or not isinstance(raw, dict):
                continue
            part_id = raw["id"]
            if part_id in here or part_id in taken:
                elsewhere = f"entry {here[part_id] + 1} of this file" if part_id in here else taken[part_id]
                report(where + ("id",), f"part id {part_id!r} is already used by {elsewhere}; ids are unique across the catalogue")
            here[part_id] = index
            values = f.convert_fields(section, raw, report, where)
            resolved = f.make_section(section, values, report, where)
            if resolved is not None:
                label = f.checked_text(raw.get("label"), "label", report, where + ("label",))
                parts.append(model.Part(kind=kind, id=part_id, label=label, section=resolved, path=str(path)))
        return parts

    return convert


def _catalogue(root: Path) -> tuple[dict[str, dict[str, model.Part]], list[Problem]]:
    catalogue: dict[str, dict[str, model.Part]] = {kind: {} for kind in model.PART_KINDS}
    taken: dict[str, str] = {}
    paths, problems = _record_files(root / "parts", root)
    for path in paths:
        if path.stem not in model.PART_KINDS or path.parent != root / "parts":
            known = ", ".join(f"{kind}.yaml" for kind in model.PART_KINDS)
            problems.append(Problem(str(path), 0, 0, "file", f"not a catalogue file; the catalogue is {known} in {root / 'parts'}"))
            continue
        parts, found = _load(path, "parts", _parts_converter(path, taken))
        problems += found
        for part in parts or ():
            catalogue[part.kind][part.id] = part
            taken[part.id] = str(path)
    return catalogue, problems


def load_catalogue(records_dir: str | os.PathLike, rules: model.ShopRules | None = None) -> dict[str, dict[str, model.Part]]:
    """kind -> id -> Part from records/parts/*.yaml; InputError with every problem.

    `rules` is accepted for a uniform loader signature; the catalogue does not depend on it.
    """
    catalogue, problems = _catalogue(Path(records_dir))
    if problems:
        raise InputError(problems)
    return catalogue


def _find_part(catalogue: dict, section: str, part_id: str, report: f.ProblemCollector, where: tuple) -> model.Part | None:
    kind = f.CATALOGUE_KIND[section]
    part = catalogue.get(kind, {}).get(part_id)
    if part is not None:
        return part
    other = next((k for k, parts in catalogue.items() if part_id in parts), None)
    ids = list(catalogue.get(kind, {}))
    close = nearest(part_id, ids, cutoff=0.4)
    if other:
        hint = f"; {part_id} is in {other}, not {kind}"
    elif close:
        hint = f"; nearest: {', '.join(close)}"
    else:
        hint = f"; the catalogue has {len(ids)} {kind}"
    report(where, f"unknown part {part_id!r} in parts/{kind}.yaml{hint}")
    return None


def known_families(catalogue: dict, rules: model.ShopRules | None) -> frozenset[str] | None:
    """Gearbox family codes a build may name: its catalogue gearboxes' and the shop's
    `families` rule; None (no check) when the shop rules could not be read."""
    return None if rules is None else _catalogue_families(catalogue) | frozenset(rules.families)


def _catalogue_families(catalogue: dict) -> frozenset[str]:
    return frozenset(part.section.family for part in catalogue.get("gearboxes", {}).values())


def _nearest_families(code: str, families: frozenset[str]) -> list[str]:
    """Known codes that differ from `code` by case, a hyphen or a space first, then look-alikes."""
    def bare(text: str) -> str:
        return "".join(ch for ch in text.upper() if ch.isalnum())

    same = sorted(family for family in families if bare(family) == bare(code))
    alike = nearest(code.upper(), sorted(families))
    return list(dict.fromkeys(same + alike))[:3]


def _check_family(gearbox: model.Gearbox | None, families: frozenset[str] | None,
                  report: f.ProblemCollector) -> None:
    if gearbox is None or families is None or gearbox.family in families:
        return
    report(("gearbox", "family"), unknown_family_message(
        gearbox.family, _nearest_families(gearbox.family, families), len(families)))


def _build_converter(catalogue: dict, stem: str | None, families: frozenset[str] | None = None
                     ) -> Callable[[dict, f.ProblemCollector], model.Build | None]:
    """Converts one build; `stem` is the file name the id must equal (None outside builds/);
    `families` the gearbox family codes it may name (None: not checked)."""

    def convert(data: dict, report: f.ProblemCollector) -> model.Build | None:
        free = {key: f.checked_text(data.get(key), key, report, (key,)) for key in _FREE_TEXT}
        sections = {name: _section(data, name, catalogue, report) for name in f.SECTION_FIELDS}
        build_id = data.get("id")
        if stem is not None and isinstance(build_id, str) and build_id != stem:
            report(("id",), f"id {build_id!r} must equal the file name {stem!r}")
        _check_family(sections["gearbox"], families, report)
        _check_combination(data, sections, report)
        when = f.date(data.get("date"), report, ("date",))
        if report.problems or any(sections[name] is None for name in _NEEDED_SECTIONS):
            return None
        return model.Build(id=build_id, date=when, status=data["status"], path=report.path,
                           **free, **sections)

    return convert


def _section(data: dict, name: str, catalogue: dict, report: f.ProblemCollector):
    raw = data.get(name)
    where = (name,)
    if not isinstance(raw, dict) or report.blocked(where):
        return None
    values = f.convert_fields(name, raw, report, where)
    part_id = raw.get("part") if name in f.CATALOGUE_KIND else None
    if part_id is not None:
        if report.blocked(where + ("part",)):  # the schema already said what is wrong with it
            return None
        part = _find_part(catalogue, name, part_id, report, where + ("part",))
        if part is None:
            return None
        if not values:  # the part alone, no overrides
            return f.referenced(part)
        values = f.merge(f.section_fields(part.section), values)
    return f.make_section(name, values, report, where, part_id)


def _check_combination(data: dict, sections: dict, report: f.ProblemCollector) -> None:
    """Slave kind against fork and fork tip movement; status against the measured section."""
    slave, gearbox = sections["slave"], sections["gearbox"]
    if slave is not None and slave.kind == "concentric":
        if "fork" in data:
            report(("fork",), "a concentric slave works without a fork: remove this section", at_key=True)
        if gearbox is not None and gearbox.fork_tip_moves != "none":
            report(("gearbox", "fork_tip_moves"), "must be none with a concentric slave")
    elif slave is not None:
        if "fork" not in data:
            report(("slave", "kind"), "an external slave works a fork: add a fork section "
                   "(pivot_to_slave, pivot_to_bearing)", field="fork")
        if gearbox is not None and gearbox.fork_tip_moves == "none":
            report(("gearbox", "fork_tip_moves"), "an external slave moves the fork tip: forward or rearward")
    status = data.get("status")
    if status in _MEASURED_STATUSES and "measured" not in data:
        report(("status",), f"status {status} needs a measured section (what the finished car showed); "
               "use draft until it is measured")


def _inside(path: Path, folder: Path) -> bool:
    return Path(os.path.realpath(path)).is_relative_to(os.path.realpath(folder))


def _load_build(path: Path, catalogue: dict, in_builds: bool, families: frozenset[str] | None,
                root: Path | None = None) -> tuple[model.Build | None, list[Problem]]:
    """`in_builds`: the file sits under records/builds/, so its id must equal its name.
    `families`: see known_families. `root`: the records folder, when `path` was not listed by
    _record_files (which checks the links it meets) and a link out of it must be refused."""
    return _load(path, "build", _build_converter(catalogue, path.stem if in_builds else None,
                                                 families), root)


def load_build_file(path: str | os.PathLike, shop: model.Shop) -> model.Build:
    """One build or proposal (it may live outside records/); InputError with every problem."""
    path = Path(path)
    root = Path(shop.root)
    build, problems = _load_build(path, shop.parts, _inside(path, root / "builds"),
                                  known_families(shop.parts, shop.rules), root)
    if problems:
        raise InputError(problems)
    return build


def _link_out_of_records(path: Path, root: Path) -> Problem | None:
    """A problem when `path` sits in the records folder but is (or passes through) a link to
    somewhere outside it; found from the link itself, before the target is read. It costs a
    realpath (an lstat per component): the walker asks only about the links it meets."""
    where = Path(os.path.abspath(path))
    real_root = Path(os.path.realpath(root))
    if not (where.is_relative_to(os.path.abspath(root)) or where.is_relative_to(real_root)):
        return None  # a file outside records/: a proposal, read where it is
    real = Path(os.path.realpath(path))
    if real.is_relative_to(real_root):
        return None
    return Problem(str(path), 0, 0, "file", f"a link to {real}, outside the records folder "
                   f"{real_root}; not read (keep records inside the records folder)")


def _looks_like_a_record(name: str) -> bool:
    """A name that would be read as a record but for its case, a leading dot or spaces
    (or other invisible characters) around it: `HW-0102.YAML`, `.HW-0102.yaml`, `HW-0102.yaml `."""
    trimmed = "".join(ch for ch in name if unicodedata.category(ch)[0] not in "ZC").strip(".")
    return trimmed.lower().endswith(YAML_SUFFIXES)


def _is_read(name: str) -> bool:
    return name.endswith(YAML_SUFFIXES) and not name.startswith(".")


def _record_files(folder: Path, root: Path) -> tuple[list[Path], list[Problem]]:
    """YAML files under `folder`, subfolders too, sorted, and a problem for everything there
    that looks like a record but would not be read: a folder that cannot be listed, a folder
    that is a link (not followed), a hidden folder holding records, a wrongly named file.
    A missing `folder` holds nothing."""
    found: list[Path] = []
    escape = _link_out_of_records(folder, root)
    if escape is not None:
        return [], [dataclasses.replace(escape, field="folder")]
    problems: list[Problem] = []
    pending = [folder]
    while pending:
        directory = pending.pop()
        try:
            with os.scandir(directory) as listing:
                entries = sorted(listing, key=lambda entry: entry.name)
        except OSError as error:
            if not (directory == folder and error.errno == errno.ENOENT):
                problems.append(_folder_problem(directory, error))
            continue
        subfolders = []
        for entry in entries:
            path = Path(entry.path)
            name = entry.name
            if entry.is_dir(follow_symlinks=False):
                if not name.startswith("."):
                    subfolders.append(path)
                elif any(_looks_like_a_record(inner) for _, _, names in os.walk(path) for inner in names):
                    problems.append(Problem(str(path), 0, 0, "folder", "a hidden folder holding record "
                                            "files, which are never read; remove the leading dot or "
                                            f"move the files out of {folder}"))
            elif entry.is_symlink() and _points_at_folder(entry):
                problems.append(Problem(str(path), 0, 0, "folder", f"a link to the folder "
                                        f"{os.path.realpath(path)}; links to folders are not "
                                        "followed: move the folder here"))
            elif _is_read(name):
                escape = _link_out_of_records(path, root) if entry.is_symlink() else None
                if escape is None:
                    found.append(path)
                else:
                    problems.append(escape)
            elif _looks_like_a_record(name):
                problems.append(Problem(str(path), 0, 0, "file", f"not read: {name!r} is not named "
                                        "like a record; name it <id>.yaml (lower-case .yaml or "
                                        ".yml, no leading dot, no spaces around it)"))
        pending.extend(reversed(subfolders))
    return found, problems


def _points_at_folder(entry: os.DirEntry) -> bool:
    try:
        return entry.is_dir()
    except OSError:  # a loop of links: said when the file is read
        return False


def _folder_problem(directory: Path, error: OSError) -> Problem:
    if error.errno == errno.ELOOP:
        why = "a loop of symbolic links"
    elif error.errno in (errno.ENOTDIR, errno.ENOENT):
        why = "not a folder"
    else:
        why = error.strerror or str(error)
    return Problem(str(directory), 0, 0, "folder", f"cannot read this folder ({why}); "
                   "the records in it would be missed")


def _duplicate_ids(builds_dir: Path, checked: Iterable[Path], listing: list[Path]) -> list[Problem]:
    """Build files in `checked` whose file name (= id) an earlier file under builds_dir also
    has, the same file reached again through a link included (reported once, at the second)."""
    first: dict[str, Path] = {}
    for path in listing:
        first.setdefault(path.stem, path)
    problems = []
    for path in checked:
        original = first.get(path.stem)
        if original is not None and original != path:
            line, col = locate(path, "id")
            if os.path.realpath(original) != os.path.realpath(path):
                how = (f"build id {path.stem} is already used by {original}; ids must be unique "
                       f"across {builds_dir}")
            elif path.is_symlink():
                how = f"this file is a link to {original}, so the same build would be read twice; remove the link"
            else:
                how = f"{original} is a link to this file, so the same build would be read twice; remove the link"
            problems.append(Problem(str(path), line, col, "id", how))
    return problems


def locate(path: str | os.PathLike, field: str) -> tuple[int, int]:
    """Line and column of a dotted field such as "pedal.layout" in a YAML file; (0, 0) when
    the file cannot be read."""
    text, _ = read_text(Path(path))
    return careful_load(text).where(tuple(field.split("."))) if text else (0, 0)


def _builds(root: Path, catalogue: dict, paths: list[Path], progress: Progress | None,
            in_builds: set[Path] | None = None, families: frozenset[str] | None = None
            ) -> tuple[list[model.Build], list[Problem]]:
    """Load build files. `in_builds`: those of `paths` under records/builds/; None when
    `paths` is the listing of records/builds/ itself. `families`: see known_families."""
    builds, problems, inside_builds = [], [], []
    with collector_paused():
        for done, path in enumerate(paths, 1):
            inside = in_builds is None or path in in_builds
            build, found = _load_build(path, catalogue, inside, families)
            problems += found
            if build is not None:
                builds.append(build)
            if inside:
                inside_builds.append(path)
            if progress is not None:
                progress(done, len(paths))
    listing = paths if in_builds is None else _record_files(root / "builds", root)[0]
    return builds, problems + _duplicate_ids(root / "builds", inside_builds, listing)


def _whole(root: Path, progress: Progress | None) -> tuple[model.ShopRules | None, dict, list[model.Build], list[Problem]]:
    """Rules, catalogue, every build under root/builds/** and every problem in them."""
    rules, problems = _rules(root)
    catalogue, found = _catalogue(root)
    listing, unread = _record_files(root / "builds", root)
    builds, found_in_builds = _builds(root, catalogue, listing, progress,
                                      families=known_families(catalogue, rules))
    return rules, catalogue, builds, problems + found + unread + found_in_builds


def load_shop(records_dir: str | os.PathLike, progress: Progress | None = None) -> model.Shop:
    """Rules, catalogue and every build under records/builds/**; InputError with every problem.

    `progress(done, total)` is called after each build file.
    """
    root = Path(records_dir)
    rules, catalogue, builds, problems = _whole(root, progress)
    if problems:
        raise InputError(problems)
    return model.Shop(root=str(root), rules=rules, parts=catalogue, builds=tuple(sorted(builds, key=lambda b: b.id)))


def validate_paths(records_dir: str | os.PathLike, paths: Iterable[str | os.PathLike] = (),
                   progress: Progress | None = None) -> list[Problem]:
    """Every problem in the given files or folders (all of records_dir when none), sorted.

    `progress(done, total)` is called after each build file.
    """
    return validate_and_load(records_dir, paths, progress)[2]


def validate_and_load(records_dir: str | os.PathLike, paths: Iterable[str | os.PathLike] = (),
                      progress: Progress | None = None
                      ) -> tuple[model.ShopRules | None, list[model.Build], list[Problem]]:
    """As validate_paths, also giving the shop rules (None when unusable) and every build
    among the paths that loaded, so a caller can size them without loading them again."""
    root = Path(records_dir)
    paths = [Path(given) for given in paths]
    if paths:
        rules, builds, problems = _given(root, paths, progress)
    else:  # the whole folder: where each file sits is known without resolving it
        rules, _, builds, problems = _whole(root, progress)
    return rules, builds, sorted(set(problems), key=lambda p: (p.path, p.line, p.col, p.field))


def _given(root: Path, paths: list[Path], progress: Progress | None
           ) -> tuple[model.ShopRules | None, list[model.Build], list[Problem]]:
    """Rules, the builds among `paths` (files or folders) and the problems in those paths."""
    targets: list[Path] = []
    problems: list[Problem] = []
    for given in paths:
        if given.is_dir():
            listing, unread = _record_files(given, root)
            targets += listing
            problems += unread
        elif given.exists() or given.is_symlink():  # a broken link or a loop: said when read
            escape = _link_out_of_records(given, root)
            if escape is None:
                targets.append(given)
            else:
                problems.append(escape)
        else:
            problems.append(Problem(str(given), 0, 0, "file", "no such file or folder"))
    real = {path: Path(os.path.realpath(path)) for path in targets}  # each resolved once
    shop_file, parts_dir, builds_dir = (Path(os.path.realpath(root / name)) for name in ("shop.yaml", "parts", "builds"))
    rules, found = _rules(root)
    if shop_file in real.values():
        problems += found
    catalogue, found = _catalogue(root)
    in_parts = {path for path in targets if real[path].is_relative_to(parts_dir)}
    build_paths = [path for path in targets if real[path] != shop_file and path not in in_parts]
    if found and (build_paths or in_parts):
        problems += found
    in_builds = {path for path in build_paths if real[path].is_relative_to(builds_dir)}
    builds, found = _builds(root, catalogue, build_paths, progress, in_builds,
                            known_families(catalogue, rules))
    return rules, builds, problems + found
