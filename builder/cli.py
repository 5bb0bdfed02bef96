"""The `fitment` command line: one function per command, heavy imports deferred.

Exit codes: 0 success, 1 invalid input (every problem printed as
``path:line:col: field: message``), 2 usage error (click's own).
"""
from __future__ import annotations

import sys
from pathlib import Path

import click

from builder.problems import InputError, Problem, terminal_safe

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


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
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
    from builder.history import unsizable
    from builder.located import unsizable_problems
    from builder.records import validate_and_load

    rules, builds, problems = validate_and_load(ctx.records, list(paths),
                                                progress=progress_reporter("validating"))
    if rules is not None:  # sizing finds pedal layouts that cannot push their master
        problems += unsizable_problems(unsizable(builds, rules))
    if problems:
        fail(problems)
    click.echo(f"All records valid ({len(builds)} builds).")


@main.command()
@click.argument("file", type=click.Path(path_type=Path))
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object (stable keys).")
@click.option("--similar", "k", type=click.IntRange(0, 50), default=5, show_default=True,
              help="How many similar past builds to list.")
@click.pass_obj
def check(ctx: Context, file: Path, as_json: bool, k: int) -> None:
    """Size one build or proposal FILE and compare it with the shop's history."""
    from builder import check as checking

    analysis = _run(ctx.analysis)
    result = _run(lambda: _sized(lambda: checking.check_file(analysis, file, k)))
    primary = analysis.shop.rules.display_units
    if as_json:
        import json

        click.echo(json.dumps(checking.contract(result, primary), indent=2, ensure_ascii=True))
    else:
        echo_safe(checking.describe(result, primary))
        if any(flag.severity == "fail" for flag in result.sizing.flags):
            click.echo("")
            click.echo(CAUTION)


@main.command()
@click.option("--format", "fmt", type=click.Choice(["table", "csv", "json"]), default="table",
              show_default=True)
@click.pass_obj
def report(ctx: Context, fmt: str) -> None:
    """One row per build: ratios, computed and measured effort, margin, flags."""
    from builder import report as reporting

    analysis = _run(ctx.analysis)
    rows = reporting.report_rows(analysis)
    echo_safe(reporting.render(rows, fmt, reporting.REPORT_TABLE_COLUMNS), nl=False)


@main.command()
@click.pass_obj
def calibration(ctx: Context) -> None:
    """Apparent efficiency and travel loss per gearbox family, with leave-one-out error."""
    from builder import report as reporting

    analysis = _run(ctx.analysis)
    echo_safe(reporting.render(reporting.calibration_rows(analysis), "table"), nl=False)
    click.echo(reporting.coverage_note(analysis))


@main.command()
@click.argument("build_id")
@click.option("--like", "like_id", help="Copy the inputs of this past build.")
@click.pass_obj
def new(ctx: Context, build_id: str, like_id: str | None) -> None:
    """Write a new draft record BUILD_ID (never overwrites an existing file)."""
    from builder import drafts

    path = _run(lambda: drafts.create(ctx.records, build_id, like_id))
    click.echo(f"Wrote {path}")


@main.group()
def site() -> None:
    """Publish the fitment reference as a static site."""


@site.command("build")
@click.option("--out", type=click.Path(file_okay=False, path_type=Path), default=Path("site"),
              show_default=True, help="Where the finished site goes (replaced only on success).")
@click.pass_obj
def site_build(ctx: Context, out: Path) -> None:
    """Build the site from the records; the previous site stays if anything fails."""
    from builder.site import build_site

    analysis = _run(ctx.analysis)
    _run(lambda: build_site(analysis, out, progress=progress_reporter("writing pages")))
    click.echo(f"Site written to {out}")


@site.command("serve")
@click.option("--port", type=click.IntRange(1024, 65535), default=8000, show_default=True)
@click.pass_obj
def site_serve(ctx: Context, port: int) -> None:
    """Build the site and serve it on 127.0.0.1 for a look (Ctrl-C stops)."""
    from builder.site import serve

    _run(lambda: serve(ctx.records, port=port))


if __name__ == "__main__":
    main()
