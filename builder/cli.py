"""The `fitment` command line: one function per command, heavy imports deferred.

Exit codes: 0 success, 1 invalid input (every problem printed as
``path:line:col: field: message``), 2 usage error (click's own), 3 when `check` finds a
fail-severity flag (sized, not ready to order).
"""
from __future__ import annotations

import sys
from pathlib import Path

import click

from builder.model import FORK_TIP_MOVES, STATUSES
from builder.problems import InputError, Problem, nearest, terminal_safe

CAUTION = (
    "Caution: clutch hydraulics run at several hundred psi; brake fluid is toxic, strips "
    "paint and takes up water; a clutch that does not fully release can let a car creep. "
    "Follow the component makers' specifications, local vehicle codes and licensed practice."
)


class Context:
    """What every command shares: the records folder and lazily loaded results."""

    def __init__(self, records: Path):
        self.records = records
        self._analysis = None

    def analysis(self):
        """The shop analysed once per command, with progress shown on a terminal."""
        if self._analysis is None:
            from builder.history import analyse
            from builder.records import load_shop

            shop = load_shop(self.records, progress=progress_reporter("loading"))
            self._analysis = _sized(lambda: analyse(shop))
        return self._analysis


def _sized(action):
    """Run `action`; builds whose pedal cannot push their master become located problems."""
    from builder.history import UnsizableBuilds
    from builder.located import unsizable_problems

    try:
        return action()
    except UnsizableBuilds as error:
        raise InputError(unsizable_problems(error.failures)) from None


def fail(problems: list[Problem]) -> None:
    """Print every problem to stderr and exit 1."""
    for problem in sorted(problems, key=lambda p: (p.path, p.line, p.col, p.field)):
        click.echo(terminal_safe(str(problem)), err=True)
    click.echo(f"{len(problems)} problem(s) found.", err=True)
    sys.exit(1)


def echo_safe(text: str, nl: bool = True) -> None:
    """Echo output holding record text with terminal_safe (CSV keeps its CRLF line ends)."""
    click.echo("\r\n".join(terminal_safe(line) for line in text.split("\r\n")), nl=nl)


def progress_reporter(label: str):
    """A progress callback that draws on a terminal and stays silent when piped."""
    if not sys.stderr.isatty():
        return None

    def report(done: int, total: int) -> None:
        end = "\n" if done >= total else ""
        sys.stderr.write(f"\r{label}: {done}/{total}{end}")
        sys.stderr.flush()

    return report


class WholeLines(click.Group):
    """A command group whose help lists each command's whole first sentence, wrapped to the
    terminal, instead of cutting it at the column width with '...'."""

    def format_commands(self, ctx: click.Context, formatter: click.HelpFormatter) -> None:
        rows = []
        for name in self.list_commands(ctx):
            command = self.get_command(ctx, name)
            if command is not None and not command.hidden:
                rows.append((name, command.get_short_help_str(limit=1_000)))
        if rows:
            with formatter.section("Commands"):
                formatter.write_dl(rows)


@click.group(cls=WholeLines, context_settings={"help_option_names": ["-h", "--help"]},
             epilog="Exit status: 0 success, 1 invalid input, 2 usage error, 3 when `check` "
                    "finds a fail-severity flag (sized, not ready to order).")
@click.option(
    "--records",
    type=click.Path(file_okay=False, path_type=Path),
    default=Path("records"),
    show_default=True,
    help="The shop's records folder (shop.yaml, parts/, builds/).",
)
@click.pass_context
def main(ctx: click.Context, records: Path) -> None:
    """Records, sizing and published fitment reference for hydraulic clutch conversions."""
    ctx.obj = Context(records)


def _run(action):
    """Run a command body, turning located input problems into exit 1."""
    try:
        return action()
    except InputError as error:
        fail(error.problems)


@main.command()
@click.argument("paths", nargs=-1, type=click.Path(path_type=Path))
@click.pass_obj
def validate(ctx: Context, paths: tuple[Path, ...]) -> None:
    """Check the shop rules, parts catalogue and build records (or only PATHS)."""
    from builder.engine.batch import pedal_refusals
    from builder.located import unsizable_problems
    from builder.records import validate_and_load

    _, builds, problems = validate_and_load(ctx.records, list(paths),
                                            progress=progress_reporter("validating"))
    problems += unsizable_problems(pedal_refusals(builds))  # pedals that cannot push their master
    if problems:
        fail(problems)
    click.echo(f"All records valid ({len(builds)} builds).")


@main.command(short_help="Size one build or proposal: verdict, similar builds, suggestions.")
@click.argument("file", metavar="FILE|ID", type=click.Path(path_type=Path))
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object (stable keys).")
@click.option("--similar", "k", type=click.IntRange(0, 50), default=5, show_default=True,
              help="How many similar past builds to list.")
@click.pass_obj
def check(ctx: Context, file: Path, as_json: bool, k: int) -> None:
    """Size one build or proposal FILE (or a recorded build by its ID) and compare it with
    the shop's history.

    The first line is the verdict: ready to order, ready with warnings, or not ready (with
    the flag codes); when not ready, the best three suggestions follow.

    Exit status: 0 ready (with or without warnings), 3 not ready (a fail-severity flag
    fired), 1 invalid input, 2 usage error.
    """
    from builder import check as checking

    analysis = _run(ctx.analysis)
    result = _run(lambda: _sized(lambda: checking.check_file(analysis, file, k)))
    primary = analysis.shop.rules.display_units
    if as_json:
        import json

        click.echo(json.dumps(checking.contract(result, primary), indent=2, ensure_ascii=True))
    else:
        echo_safe(checking.describe(result, primary))
        if result.verdict == "not_ready":
            click.echo("")
            click.echo(CAUTION)
    if result.verdict == "not_ready":
        sys.exit(checking.EXIT_NOT_READY)


@main.command(short_help="Which master, slave and clevis hole to order for a proposal.")
@click.argument("file", metavar="FILE|ID", type=click.Path(path_type=Path))
@click.option("--top", type=click.IntRange(1, 100), default=5, show_default=True,
              help="How many suggestions to list.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object (stable keys).")
@click.option("--sizes", type=click.Choice(["catalogue", "standard"]), default="catalogue",
              show_default=True, help="catalogue: the shop's parts only; standard: also the "
              "common bores the catalogue lacks (1/16 in steps 5/8 to 1-1/8 in, whole mm 15 "
              "to 28 mm), marked not in catalogue.")
@click.pass_obj
def suggest(ctx: Context, file: Path, top: int, as_json: bool, sizes: str) -> None:
    """Which master, slave and clevis hole to order for FILE (or a recorded build's ID).

    Keeps what the car fixes and tries every catalogue master and slave of the right kind
    (and the pedal's other clevis holes), each sized by the engine and predicted with the
    shop's calibration. Qualifying combinations come first, effort nearest the shop's target;
    when none qualifies, the three nearest misses and the rule each misses.
    """
    from builder import check as checking
    from builder import presentation as say
    from builder.history.suggest import suggest as suggesting

    analysis = _run(ctx.analysis)
    build = _run(lambda: checking.resolve(analysis, file))
    result = _run(lambda: _sized(lambda: suggesting(analysis, build, sizes)))
    primary = analysis.shop.rules.display_units
    if as_json:
        import json

        click.echo(json.dumps(checking.suggest_contract(result, build, top, primary), indent=2,
                              ensure_ascii=True))
    else:
        echo_safe(say.suggestions_text(result, build, primary, top))
        click.echo("")
        click.echo(CAUTION)


@main.command()
@click.option("--format", "fmt", type=click.Choice(["table", "csv", "json"]), default="table",
              show_default=True, help="table: display units, words; csv and json: SI-derived units.")
@click.option("--family", help="Only builds of this gearbox family, e.g. QX-5.")
@click.option("--fork", type=click.Choice(FORK_TIP_MOVES),
              help="Only builds whose fork tip moves this way (none: concentric slave).")
@click.option("--status", type=click.Choice(STATUSES), help="Only builds with this status.")
@click.pass_obj
def report(ctx: Context, fmt: str, family: str | None, fork: str | None, status: str | None) -> None:
    """One row per build: ratios, computed and measured effort, margin, flags."""
    from builder import report as reporting

    analysis = _run(ctx.analysis)
    if family is not None:
        _known_family(analysis, family)
    filters = reporting.Filters(family, fork, status)
    if fmt == "table":
        text = reporting.report_table(analysis, analysis.shop.rules.display_units, filters)
    else:
        text = reporting.render(reporting.report_rows(analysis, filters), fmt)
    echo_safe(text, nl=False)


def _known_family(analysis, family: str) -> None:
    """A usage error (exit 2) for a --family the shop has never heard of, naming the nearest.
    The shop's builds were loaded against the same families, so they name none outside it."""
    from builder.records import known_families

    known = known_families(analysis.shop.parts, analysis.shop.rules)
    if family not in known:
        close = nearest(family.upper(), sorted(known))
        hint = f"nearest: {', '.join(close)}" if close else f"known: {', '.join(sorted(known))}"
        raise click.BadParameter(f"no gearbox family {family!r} in this shop; {hint}",
                                 param_hint="--family")


@main.command()
@click.pass_obj
def calibration(ctx: Context) -> None:
    """Apparent efficiency and travel loss per gearbox family, with leave-one-out error."""
    from builder import report as reporting

    analysis = _run(ctx.analysis)
    echo_safe(reporting.calibration_table(analysis), nl=False)
    click.echo(reporting.coverage_note(analysis))


@main.command()
@click.argument("build_id")
@click.option("--like", "like_id", help="Copy the inputs of this past build.")
@click.pass_obj
def new(ctx: Context, build_id: str, like_id: str | None) -> None:
    """Write a new draft record BUILD_ID (never overwrites an existing file)."""
    from builder import drafts

    def create():
        try:
            return drafts.create(ctx.records, build_id, like_id), []
        except drafts.LeftToFill as left:
            return left.path, left.problems

    path, to_fill = _run(create)
    click.echo(f"Wrote {path}" + ("; fill in before sizing it:" if to_fill else ""))
    for problem in sorted(to_fill, key=lambda p: (p.line, p.col)):  # top to bottom, as in the file
        click.echo(terminal_safe(f"  {problem}"))


@main.command("import")
@click.argument("file", type=click.Path(path_type=Path))
@click.option("--map", "map_file", required=True, type=click.Path(path_type=Path),
              help="The import map: which column fills which record field (YAML).")
@click.option("--dry-run", is_flag=True, help="Write nothing; print what would be written.")
@click.pass_obj
def import_(ctx: Context, file: Path, map_file: Path, dry_run: bool) -> None:
    """Import past builds from a spreadsheet FILE (CSV or .xlsx), one build per row.

    Valid rows are written as builds/<year>/<id>.yaml (never over an existing file); refused
    rows are listed as FILE:row:column: field: message and the command exits 1.
    """
    from builder.importing import import_sheet

    result = _run(lambda: import_sheet(file, map_file, ctx.records, dry_run=dry_run))
    click.echo(f"Read {terminal_safe(result.sheet.path)} ({terminal_safe(result.sheet.describe())}): "
               f"{len(result.sheet.rows)} rows.")
    verb = "would write" if dry_run else "wrote"
    for done in result.written:
        echo_safe(f"{verb} {done.path} (row {done.row})")
    for done in result.skipped:
        echo_safe(f"skipped row {done.row}: {done.id} is already in the shop, the same record ({done.path})")
    if result.unused_columns:
        echo_safe("not imported (no field in the map): " + ", ".join(result.unused_columns))
    if result.left_out:
        click.echo("left out (nothing in the map's columns): row " + ", ".join(map(str, result.left_out)))
    for problem in result.refused:
        click.echo(terminal_safe(str(problem)), err=True)
    counts = (f"{len(result.written)} {'would be written' if dry_run else 'written'}, "
              f"{len(result.skipped)} skipped, {len(result.refused_rows)} refused")
    if result.refused_rows:
        counts += f" (rows {', '.join(map(str, result.refused_rows))})"
    click.echo(("Dry run, nothing written: " if dry_run else "") + counts + ".")
    if result.refused_rows:
        click.echo("Refused rows are listed above; fix them in the sheet and import again "
                   "(rows already written are then skipped).", err=True)
        sys.exit(1)


@main.group(cls=WholeLines)
def site() -> None:
    """Publish the fitment reference as a static site."""


@site.command("build")
@click.option("--out", type=click.Path(file_okay=False, path_type=Path), default=Path("site"),
              show_default=True, help="Where the finished site goes (replaced only on success).")
@click.option("--include-drafts", is_flag=True,
              help="Also publish draft builds: an internal copy, not for the public.")
@click.pass_obj
def site_build(ctx: Context, out: Path, include_drafts: bool) -> None:
    """Build the site from the records; the previous site stays if anything fails."""
    from builder.site import publish_site

    analysis = _run(ctx.analysis)
    _run(lambda: publish_site(analysis, out, progress=progress_reporter("writing pages"),
                            include_drafts=include_drafts))
    click.echo(f"Site written to {out}" + (" (internal copy: drafts included)" if include_drafts else ""))


@site.command("serve")
@click.option("--port", type=click.IntRange(1024, 65535), default=8000, show_default=True)
@click.pass_obj
def site_serve(ctx: Context, port: int) -> None:
    """Build the site and serve it on 127.0.0.1 for a look (Ctrl-C stops)."""
    from builder.site import serve
    from builder.site.serve import PortUnavailable

    try:
        _run(lambda: serve(ctx.records, port=port))
    except PortUnavailable as error:  # found before anything is loaded or built
        raise click.BadParameter(str(error), param_hint="'--port'") from None


if __name__ == "__main__":
    main()
