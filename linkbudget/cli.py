"""The command line: a thin Typer app wiring config, engine and reports together.

Exit codes, for every command: 0 the link closes / the command succeeded; 1 a link does not
meet its margin or overload; 2 the input is wrong; 3 an internal error (a bug).
"""

import contextlib
import signal
import sys
from enum import Enum
from pathlib import Path
from typing import Annotated

import typer

from linkbudget import __version__
from linkbudget.messages import format_hint

EXIT_OK, EXIT_FAILS, EXIT_INPUT, EXIT_BUG = 0, 1, 2, 3

#: The exit codes as the help text states them (README "Commands" says the same).
EXIT_HELP = ("Exit status: 0 the link closes (every link, for check) or the command succeeded; "
             "1 a link does not meet its margin or exceeds the receiver overload; "
             "2 the input is wrong (the message names file, line, column and key); "
             "3 an internal error, a bug: please report it; "
             "reach also: 4 the key never limits the link, 5 the link closes at no value of it.")

app = typer.Typer(
    help="Optical link budgets from physics and datasheets, kept as YAML.\n\n" + EXIT_HELP,
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
    rich_markup_mode=None,  # plain help text: rich's help renderer costs ~80 ms of start-up
)


class _Command(typer.core.TyperCommand):
    """A command whose help names each argument by its metavar alone; typer would add the Python
    type of the parameter (``<list[Path]>``), which tells a user nothing."""

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        for param in self.params:
            if isinstance(param, typer.core.TyperArgument):
                param.display_type_rich = lambda ctx: None


class Format(str, Enum):
    terminal = "terminal"
    json = "json"
    markdown = "markdown"
    csv = "csv"
    html = "html"


#: The option of every command that loads links: a folder outside the project a link may read from.
AllowPath = Annotated[list[Path] | None, typer.Option(
    "--allow-path", metavar="DIR",
    help="Let the links read files (materials, parts) in this folder outside their project; repeatable.")]


#: The options of a command that writes one report and of one that overrides the required margin.
OutputFile = Annotated[Path | None, typer.Option(
    "--output", "-o", metavar="FILE", help="Write to this file instead of the terminal.")]
MinMargin = Annotated[str | None, typer.Option(
    "--min-margin", metavar="MARGIN", help="Override the required margin, e.g. '3 dB'.")]


def _fail_input(message):
    typer.echo(message, err=True)
    raise typer.Exit(EXIT_INPUT)


def _evaluated(path, allow_paths, required_margin_db):
    """The loaded link and its result; an input error in either exits 2 with its placed message."""
    from linkbudget.config import ConfigError, load_link
    from linkbudget.engine import evaluate

    try:
        loaded = load_link(path, allow_paths)
        return loaded, evaluate(loaded, required_margin_db=required_margin_db)
    except ConfigError as error:
        _fail_input(str(error))


def _ratio_option(option, text, *, what="a margin", lower=0.0, upper=None):
    """The dB value of an option (``None`` when not given; ``what`` it is, for the message): at
    least ``lower``, or at most ``upper`` when ``lower`` is ``None``."""
    if text is None:
        return None
    from linkbudget.units import UnitError, parse_quantity

    try:
        value_db = parse_quantity(text, "ratio")
    except UnitError as error:
        _fail_input(f"{option}: {error}{format_hint(error.hint)}")
    if lower is not None and not value_db >= lower or upper is not None and not value_db <= upper:
        bound = f">= {lower:g} dB" if lower is not None else f"<= {upper:g} dB"
        _fail_input(f"{option}: {what} is {bound}, got {text!r}")
    return value_db


def _hazard_level_option(text):
    if text is None:
        return None
    from linkbudget.gates import hazard_level_option

    try:
        return hazard_level_option(text)
    except ValueError as error:
        _fail_input(f"--max-hazard-level: {error}")


def _margin_override(text):
    return _ratio_option("--min-margin", text)


#: The options of every command that can run a statistical budget.
Trials = Annotated[int | None, typer.Option(
    "--trials", metavar="N", help="Run a statistical budget of N Monte Carlo trials (overrides the file's "
    "statistics.trials).")]
Seed = Annotated[int | None, typer.Option(
    "--seed", metavar="SEED", help="Seed of the trials' random draws (default: the file's statistics.seed, else 0).")]
Quiet = Annotated[bool, typer.Option("--quiet", "-q", help="No progress bar during the trials.")]


def _checked_count(option, value, what):
    """``value`` of a whole-number ``option`` within the range ``what``, or exit 2."""
    from linkbudget.config.ranges import RANGES

    problem = None if value is None else RANGES[what].problem(value)
    if problem is not None:
        _fail_input(f"{option}: {problem}")
    return value


@contextlib.contextmanager
def _trial_progress(quiet):
    """A progress callback drawing a bar on stderr while trials run, or ``None`` (``--quiet``, or
    stderr is not a terminal)."""
    from rich.console import Console

    console = Console(stderr=True)
    if quiet or not console.is_terminal:
        yield None
        return
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeRemainingColumn

    with Progress(TextColumn("trials"), BarColumn(), MofNCompleteColumn(), TimeRemainingColumn(),
                  console=console, transient=True) as bar:
        task = bar.add_task("trials", total=None)

        def advance(done, total=None):
            bar.update(task, completed=done, **({} if total is None else {"total": total}))

        yield advance


def _requested_trials(loaded, trials, seed):
    """(trials, seed) that ``--trials``/``--seed`` or the file's statistics block ask for (each
    option checked against its range), or ``None``."""
    from linkbudget.statistics import requested

    return requested(loaded.spec, _checked_count("--trials", trials, "trial count"),
                     _checked_count("--seed", seed, "seed"))


def _with_trials(loaded, result, trials, seed, quiet):
    """``result`` with its statistical budget, when ``--trials`` or the file's ``statistics`` asks."""
    from linkbudget.statistics import with_statistics

    asked = _requested_trials(loaded, trials, seed)
    if asked is None:
        if seed is not None:
            _fail_input("--seed: a seed is for trials; give --trials N too, or a statistics block in the file")
        return result
    with _trial_progress(quiet) as progress:
        return with_statistics(loaded, result, trials=asked[0], seed=asked[1], progress=progress)


def _yield_fraction(text, option="--min-yield"):
    """``option`` (a yield) as a fraction: ``99.9%`` or ``0.999``; exit 2 when it is not one."""
    if text is None:
        return None
    stripped = text.strip()
    try:
        value = float(stripped[:-1]) / 100 if stripped.endswith("%") else float(stripped)
    except ValueError:
        _fail_input(f"{option}: cannot read {text!r} as a yield, e.g. '99.9%' or 0.999")
    if not 0 < value <= 1:
        _fail_input(f"{option}: a yield is above 0 and at most 100 %, got {text!r}")
    return value


def _version(value: bool):
    if value:
        typer.echo(f"linkbudget {__version__}")
        raise typer.Exit()


@app.callback()
def _root(
    version: Annotated[bool | None, typer.Option("--version", callback=_version, is_eager=True,
                                                    help="Print the version and exit.")] = None,
):
    """Optical link budgets from physics and datasheets, kept as YAML."""


def _report_text(result, output_format, link=None):
    """The report in one of the file formats (terminal output as plain text): a string, or for
    JSON an iterator of its pieces, so that a large sweep is streamed, never one string. The HTML
    page shows the SHA-256 of the ``link`` file."""
    if output_format is Format.html:
        from linkbudget.report.html import file_sha256, render, statistics_sections

        return render(result, input_sha256=file_sha256(link), sections=statistics_sections(result))
    if output_format is Format.json:
        from linkbudget.report.json import json_chunks

        return json_chunks(result)
    if output_format is Format.markdown:
        from linkbudget.report.markdown import render

        return render(result)
    if output_format is Format.csv:
        from linkbudget.report.csv import render

        return render(result)
    import io

    from rich.console import Console

    from linkbudget.report.terminal import render

    console = Console(file=io.StringIO(), width=120)
    console.print(render(result))
    return console.file.getvalue()


@app.command(cls=_Command)
def run(
    link: Annotated[Path, typer.Argument(metavar="LINK", help="The link file (YAML).")],
    output_format: Annotated[Format, typer.Option("--format", "-f", help="Output format.")] = Format.terminal,
    output: OutputFile = None,
    force: Annotated[bool, typer.Option("--force", help="Replace an existing --output or --plot file.")] = False,
    min_margin: MinMargin = None,
    plot: Annotated[Path | None, typer.Option(
        "--plot", metavar="FILE",
        help="Also draw the power along the chain (and the margin per wavelength) as FILE.png or FILE.svg; "
             'needs the plot extra: pip install "linkbudget[plot]".')] = None,
    allow_path: AllowPath = None,
    trials: Trials = None,
    seed: Seed = None,
    quiet: Quiet = False,
):
    """Print the budget of one link: every segment, received power, margins, verdict; with
    --trials (or the file's statistics block) its statistical budget too.

    Exit status 0 the link closes, 1 it does not, 2 the input is wrong, 3 a bug.
    """
    _check_plot_option(plot, output)
    loaded, result = _evaluated(link, allow_path or (), _margin_override(min_margin))
    result = _with_trials(loaded, result, trials, seed, quiet)
    protected = [link, *loaded.referenced_files]
    if plot is not None:
        from linkbudget.report.plots import run_panels

        _write_plot(run_panels(result), plot, force, protected)
    _emit(result, output_format, output, force, protected, link)
    raise typer.Exit(EXIT_OK if result.closes else EXIT_FAILS)


def _check_plot_option(plot, output):
    """Before any work: ``--plot`` names a PNG or SVG file other than ``--output``, and matplotlib is there."""
    if plot is None:
        return
    from linkbudget.report.plots import PLOT_SUFFIXES, PlotsUnavailable, require_matplotlib

    if plot.suffix.lower() not in PLOT_SUFFIXES:
        _fail_input(f"--plot: {plot}: give a file name ending in {' or '.join(PLOT_SUFFIXES)}")
    if output is not None and plot.resolve() == output.resolve():
        _fail_input(f"--plot: {plot}: the same file as --output; give two names")
    try:
        require_matplotlib()
    except PlotsUnavailable as missing:
        _fail_input(f"--plot: {missing}")


def _write_plot(panels, plot, force, protected):
    """The diagrams ``panels`` as the PNG or SVG file ``plot``, written atomically."""
    from linkbudget.report.plots import figure, plot_bytes

    _write_output(plot, plot_bytes(figure(panels), plot.suffix[1:].lower()), force, protected)


def _emit(result, output_format, output, force, protected, link=None):
    if output is None and output_format is Format.terminal:
        from rich.console import Console

        from linkbudget.report.terminal import render

        Console().print(render(result))
        return
    _write_or_print(_report_text(result, output_format, link), output, force, protected)


class ReportFormat(str, Enum):
    """The formats of ``check``."""

    text = "text"
    json = "json"
    markdown = "markdown"


class DiffFormat(str, Enum):
    """The formats of ``diff``."""

    text = "text"
    json = "json"
    markdown = "markdown"
    html = "html"


@app.command(cls=_Command)
def check(
    links: Annotated[list[str], typer.Argument(
        metavar="LINK",
        help="Link files, folders (the links and part files under them), glob patterns, or - for standard input.")],
    min_margin: Annotated[str | None, typer.Option(
        "--min-margin", metavar="MARGIN",
        help="Required worst-case margin for every file, e.g. '3dB' (overrides each file's own).")
    ] = None,
    output_format: Annotated[ReportFormat, typer.Option("--format", "-f", help="Report format.")] = ReportFormat.text,
    output: Annotated[
        Path | None, typer.Option("--output", "-o", metavar="FILE", help="Write the report to this file.")
    ] = None,
    junit: Annotated[
        Path | None, typer.Option("--junit", metavar="FILE", help="Also write JUnit XML: one test case per link.")
    ] = None,
    force: Annotated[bool, typer.Option("--force", help="Replace an existing --output or --junit file.")] = False,
    max_hazard_level: Annotated[str | None, typer.Option(
        "--max-hazard-level", metavar="LEVEL",
        help="Fail a link with a reachable point above this hazard level (1, 1M, 3R, 3B), by its estimate.")
    ] = None,
    max_back_reflection: Annotated[str | None, typer.Option(
        "--max-back-reflection", metavar="DB",
        help="Fail a link whose worst-case back reflection toward the source is above this, e.g. '-30dB' "
             "(overrides each source's max_back_reflection, which is checked without it).")
    ] = None,
    max_pdl: Annotated[str | None, typer.Option(
        "--max-pdl", metavar="DB", help="Fail a link whose polarization-dependent loss is above this, e.g. '0.5dB'.")
    ] = None,
    allow_path: AllowPath = None,
    min_yield: Annotated[str | None, typer.Option(
        "--min-yield", metavar="YIELD",
        help="Gate on the statistical budget instead of the worst case: pass when at least this share of "
             "trials closes at every wavelength, e.g. '99.9%'. Needs --trials or a statistics block.")] = None,
    trials: Trials = None,
    seed: Seed = None,
    quiet: Quiet = False,
):
    """The CI gate: one line per link, exit 0 only if every link closes (or, with --min-yield,
    reaches the yield) and passes the gates asked for.

    Exit status 0 every link passes, 1 one does not, 2 an input is wrong, 3 a bug.
    """
    import time

    from linkbudget.config import ConfigError
    from linkbudget.engine import evaluate
    from linkbudget.gates import gate_failures
    from linkbudget.inputs import expand, load_argument
    from linkbudget.report import check as reports

    required = _margin_override(min_margin)
    gates = {"max_hazard_level": _hazard_level_option(max_hazard_level),
             "max_back_reflection_db": _ratio_option("--max-back-reflection", max_back_reflection, lower=None,
                                                     upper=0.0, what="a back reflection, a fraction of the launch,"),
             "max_pdl_db": _ratio_option("--max-pdl", max_pdl, what="a polarization-dependent loss")}
    least_yield = _yield_fraction(min_yield)
    outcomes, protected, loaded_links = [], [], []
    streaming = output is None and output_format is ReportFormat.text
    for item in expand(links):
        started = time.perf_counter()
        try:
            loaded = load_argument(item, allow_path or ())
            loaded_links.append(loaded)
            protected += [item.path, *loaded.referenced_files] if item.path else [*loaded.referenced_files]
            result = _with_trials(loaded, evaluate(loaded, required_margin_db=required), trials, seed, quiet)
            if least_yield is not None and result.statistics is None:
                outcome = reports.CheckOutcome(item.name, error=f"{item.name}: --min-yield needs trials: give --trials "
                                               "N, or a statistics block ({trials: N, seed: S}) in the file",
                                               seconds=time.perf_counter() - started)
            else:
                outcome = reports.CheckOutcome(item.name, result, seconds=time.perf_counter() - started,
                                               least_yield=least_yield,
                                               failures=tuple(gate_failures(result, **gates)))
        except ConfigError as error:
            outcome = reports.CheckOutcome(item.name, error=str(error), seconds=time.perf_counter() - started)
        outcomes.append(outcome)
        if streaming:
            typer.echo(outcome.line)
        if outcome.error is not None:
            typer.echo(outcome.error, err=True)
    if streaming and outcomes:
        typer.echo(reports.summary_line(outcomes))
    broken_part_files = _checked_part_files(links, loaded_links, allow_path or (), to_stderr=not streaming)
    if not streaming:
        render = {ReportFormat.text: reports.render_lines, ReportFormat.markdown: reports.render_markdown,
                  ReportFormat.json: lambda found: reports.render_json(found, required)}[output_format]
        _write_or_print(render(outcomes), output, force, protected)
    if junit is not None:
        _write_or_print(reports.render_junit(outcomes), junit, force, protected)
    broken = reports.counts(outcomes)[3]
    raise typer.Exit(EXIT_INPUT if broken or broken_part_files else EXIT_FAILS if reports.failed(outcomes) else EXIT_OK)


def _write_or_print(text, output, force, protected):
    """``text`` (a string or its pieces) to standard output, or atomically to the file ``output``."""
    if output is None:
        sys.stdout.writelines([text] if isinstance(text, str) else text)
        return
    _write_output(output, text, force, protected)


def _write_output(output, text, force, protected=()):
    """Write an output file atomically (:func:`~linkbudget.report.output.write_atomic`); a refusal exits 2."""
    from linkbudget.report.output import OutputError, write_atomic

    try:
        write_atomic(output, text, overwrite=force, protected=protected)
    except OutputError as error:
        _fail_input(str(error))


@app.command(cls=_Command)
def diff(
    first: Annotated[str, typer.Argument(metavar="OLD|LINK", help="The old link file, or the link to compare.")],
    second: Annotated[str | None, typer.Argument(
        metavar="NEW|REV1..REV2", help="The new link file, or two git revisions of LINK.")] = None,
    against: Annotated[str | None, typer.Option(
        "--against", metavar="REV", help="Compare LINK as it is now with LINK at this git revision.")] = None,
    output_format: Annotated[DiffFormat, typer.Option("--format", "-f", help="Output format.")] = DiffFormat.text,
    output: OutputFile = None,
    force: Annotated[bool, typer.Option("--force", help="Replace an existing --output or --plot file.")] = False,
    plot: Annotated[Path | None, typer.Option(
        "--plot", metavar="FILE",
        help="Also draw both revisions' power along the chain on one diagram as FILE.png or FILE.svg; "
             'needs the plot extra: pip install "linkbudget[plot]".')] = None,
    max_margin_loss: Annotated[str | None, typer.Option(
        "--max-margin-loss", metavar="DB",
        help="Exit 1 when the worst-case margin falls by more than this at any wavelength, e.g. '0.5dB'.")] = None,
    allow_path: AllowPath = None,
):
    """What a change did to a link: two files, or one file at two git revisions.

    Exit status 0 compared (and the gate, if given, passed), 1 --max-margin-loss exceeded,
    2 the input is wrong (a file, a revision, no repository), 3 a bug.
    """
    from linkbudget.config import ConfigError
    from linkbudget.diff import compare, load_sides
    from linkbudget.gitread import GitError

    max_loss_db = _ratio_option("--max-margin-loss", max_margin_loss)
    _check_plot_option(plot, output)
    try:
        old, new = load_sides(first, second, against=against, allow_paths=tuple(allow_path or ()))
    except (GitError, ConfigError) as error:
        _fail_input(str(error))
    found = compare(old, new)
    protected = [side.link_path for side in (old, new) if side.link_path] + [
        path for side in (old, new) for path in side.link.referenced_files]
    if plot is not None:
        from linkbudget.report.diff_html import diff_panels

        _write_plot(diff_panels(found), plot, force, protected)
    if output is None and output_format is DiffFormat.text:
        from rich.console import Console

        from linkbudget.report.diff_text import render_terminal

        Console().print(render_terminal(found, max_loss_db))
    else:
        _write_or_print(_diff_text(found, output_format, max_loss_db), output, force, protected)
    raise typer.Exit(EXIT_FAILS if max_loss_db is not None and found.margin_loss_exceeds(max_loss_db) else EXIT_OK)


def _diff_text(found, output_format, max_loss_db):
    if output_format is DiffFormat.html:
        from linkbudget.report.diff_html import render

        return render(found, max_loss_db)
    if output_format is DiffFormat.json:
        from linkbudget.report.diff_json import diff_json_chunks

        return diff_json_chunks(found, max_loss_db)
    if output_format is DiffFormat.markdown:
        from linkbudget.report.diff_text import render_markdown

        return render_markdown(found, max_loss_db)
    import io

    from rich.console import Console

    from linkbudget.report.diff_text import render_terminal

    console = Console(file=io.StringIO(), width=120)
    console.print(render_terminal(found, max_loss_db))
    return console.file.getvalue()


def _checked_part_files(arguments, loaded_links, allow_paths, *, to_stderr=False):
    """Check the part files among ``arguments`` and under their folders and say which parts no link
    uses (on standard error when standard output holds a report); the number that have errors."""
    from linkbudget.report.summary import check_error_line
    from linkbudget.report.usage import part_files_summary, unused_lines
    from linkbudget.usage import checked_part_file, part_files_in, unused

    checked = [checked_part_file(path, allow_paths) for path in part_files_in(arguments)]
    for part_file in checked:
        if part_file.problems:
            typer.echo(check_error_line(part_file.path), err=to_stderr)
            typer.echo("\n".join(problem.render() for problem in part_file.problems), err=True)
    unused_parts = unused(checked, loaded_links) if loaded_links else []
    for line in unused_lines(unused_parts, "checked"):
        typer.echo(line, err=to_stderr)
    broken = sum(bool(part_file.problems) for part_file in checked)
    if checked:
        typer.echo(part_files_summary(len(checked), broken, sum(len(names) for _, names in unused_parts)),
                   err=to_stderr)
    return broken


@app.command(cls=_Command)
def uses(
    part: Annotated[str, typer.Argument(metavar="PART", help="The name of a part.")],
    folder: Annotated[Path, typer.Argument(metavar="FOLDER", help="The folder to look in (default: here).")
                      ] = Path("."),
    allow_path: AllowPath = None,
):
    """Where a part is used: every link under FOLDER that uses PART (or a part built on it), then the
    parts no link there uses.

    Exit status 0 done, 2 PART is in no part file there and no link uses it, or an input is wrong.
    """
    from linkbudget.report.usage import unused_lines, use_line, uses_heading
    from linkbudget.usage import survey, unused, users

    if not folder.is_dir():
        _fail_input(f"{folder}: not a folder")
    found = survey(folder, allow_path or ())
    listed = users(part, found.loaded)
    typer.echo(uses_heading(part, len(listed), len({path for path, _ in listed}), folder))
    for path, use in listed:
        typer.echo(use_line(path, use, part))
    for line in unused_lines(unused(found.part_files, [link for _, link in found.loaded]), f"under {folder}"):
        typer.echo(line)
    for path, error in found.broken:
        typer.echo(f"{path}: not loaded, so not searched:\n{error}", err=True)
    for part_file in found.part_files:
        if part_file.problems:
            typer.echo("\n".join(problem.render() for problem in part_file.problems), err=True)
    defined = any(part in part_file.names for part_file in found.part_files)
    if not listed and not defined:
        _fail_input(f"no part '{part}' in the part files under {folder}")
    raise typer.Exit(EXIT_INPUT if found.broken or any(f.problems for f in found.part_files) else EXIT_OK)


@app.command(cls=_Command)
def materials(
    name: Annotated[
        str | None, typer.Argument(metavar="NAME", help="A catalog name or a material file; omit to list the catalog.")
    ] = None,
    wavelength: Annotated[
        list[str] | None, typer.Option("--wavelength", "-w", metavar="WAVELENGTH", help="Wavelength(s), e.g. '1550nm'.")
    ] = None,
):
    """List the material catalog, or show one material's n, κ, α and dB/mm at given wavelengths."""
    import numpy as np
    from rich.console import Console

    from linkbudget.config import ConfigError
    from linkbudget.materials.dispersion import MaterialRangeError
    from linkbudget.materials.library import MaterialError, catalog_names, covering_hint, load_material
    from linkbudget.paths import PathRefused
    from linkbudget.report.materials import catalog_table, constants_table
    from linkbudget.units import WAVELENGTH_EXAMPLE, UnitError, parse_quantity

    try:
        if name is None:
            if wavelength:
                _fail_input("--wavelength needs a material name")
            Console().print(catalog_table([load_material(entry) for entry in catalog_names()]))
            return
        material = load_material(name)
        if not wavelength:
            Console().print(catalog_table([material]))
            Console().print("give --wavelength to see its constants")
            return
        wavelength_m = np.array([parse_quantity(text, "length", WAVELENGTH_EXAMPLE) for text in wavelength])
        Console().print(constants_table(material, wavelength_m))
    except UnitError as error:
        _fail_input(f"--wavelength: {error}{format_hint(error.hint)}")
    except MaterialRangeError as error:  # its message names the material
        _fail_input(f"{error}{format_hint(covering_hint(name, wavelength_m))}")
    except (MaterialError, PathRefused) as error:  # their messages name the material or file
        _fail_input(f"{error}{format_hint(getattr(error, 'hint', None))}")
    except ConfigError as error:  # a malformed material file, placed
        _fail_input(str(error))


@app.command(cls=_Command)
def schema(
    output: OutputFile = None,
    force: Annotated[bool, typer.Option("--force", help="Replace an existing --output file.")] = False,
    parts: Annotated[bool, typer.Option("--parts", help="The schema of part files (*.parts.yaml) instead.")] = False,
):
    """Print the JSON Schema of link files (or of part files), for an editor's YAML language server."""
    from linkbudget.config.json_schema import schema_text

    _write_or_print(schema_text(parts=parts), output, force, ())


#: Exit codes of ``reach`` beyond 0 (a limit found), 2 (input) and 3 (a bug).
EXIT_NEVER_LIMITS, EXIT_NEVER_CLOSES = 4, 5


class ReachFormat(str, Enum):
    terminal = "terminal"
    json = "json"


@app.command(cls=_Command)
def reach(
    link: Annotated[Path, typer.Argument(metavar="LINK", help="The link file (YAML).")],
    vary: Annotated[str, typer.Option(
        "--vary", metavar="SEGMENT.KEY",
        help="The key to vary: a segment's name and key (e.g. 'buried trunk.length', 'splices.count') "
             "or source.power.")],
    output_format: Annotated[ReachFormat, typer.Option("--format", "-f", help="Output format.")] = ReachFormat.terminal,
    output: OutputFile = None,
    force: Annotated[bool, typer.Option("--force", help="Replace an existing --output file.")] = False,
    min_margin: MinMargin = None,
    allow_path: AllowPath = None,
    stated_yield: Annotated[str | None, typer.Option(
        "--yield", metavar="YIELD",
        help="Search the limit where this share of the trials still closes, e.g. '99.9%', instead of the worst "
             "case. Needs --trials or a statistics block.")] = None,
    trials: Trials = None,
    seed: Seed = None,
    quiet: Quiet = False,
):
    """How far one key can go: the largest value (for source.power the smallest) at which the link
    still closes in the worst case (with --yield: in that share of the trials), the margin there,
    the wavelength and what limits it.

    Exit status 0 a limit was found, 4 the key never limits the link within its valid range,
    5 the link closes at no value of it, 2 the input is wrong, 3 a bug.
    """
    from linkbudget.config import ConfigError, load_link
    from linkbudget.reach import LIMITED, NEVER_LIMITS, ReachError, find_reach, target_of, worst_case_slack
    from linkbudget.report.reach import reach_json, reach_text

    required = _margin_override(min_margin)
    try:
        loaded = load_link(link, allow_path or ())
        slack = _reach_slack(loaded, _yield_fraction(stated_yield, "--yield"), trials, seed)
        target = target_of(loaded, vary)
        with _trial_progress(quiet or slack is worst_case_slack) as progress:
            found = find_reach(loaded, target, slack=_counted(slack, progress), required_margin_db=required)
    except (ConfigError, ReachError) as error:
        _fail_input(str(error))
    text = reach_json(found) if output_format is ReachFormat.json else reach_text(found)
    _write_or_print(text, output, force, [link, *loaded.referenced_files])
    codes = {LIMITED: EXIT_OK, NEVER_LIMITS: EXIT_NEVER_LIMITS}
    raise typer.Exit(codes.get(found.outcome, EXIT_NEVER_CLOSES))


def _reach_slack(loaded, stated_yield, trials, seed):
    """The slack function of ``reach``: the worst case, or with ``--yield`` the yield over the
    trials of ``--trials`` (or the file's statistics block)."""
    from linkbudget.reach import worst_case_slack
    from linkbudget.reach_yield import YieldCriterion

    asked = _requested_trials(loaded, trials, seed)
    if stated_yield is None:
        if trials is not None or seed is not None:
            _fail_input("--trials/--seed: reach runs trials only for a yield; give --yield too, e.g. --yield 99.9%")
        return worst_case_slack
    if asked is None:
        _fail_input("--yield needs trials: give --trials N, or a statistics block ({trials: N, seed: S}) in the file")
    return YieldCriterion(stated_yield, *asked)


def _counted(slack, progress):
    """``slack`` reporting to ``progress`` the trials drawn so far after each evaluation (as is
    without a progress bar)."""
    if progress is None:
        return slack
    done = [0]

    def counted(link, required_margin_db=None):
        found = slack(link, required_margin_db)
        done[0] += slack.trials
        progress(done[0])
        return found

    return counted


def _interrupted(signum, frame):
    """Ctrl-C (or SIGINT): stop with the shell's 128 + signal number (130), never a verdict's 1."""
    typer.echo("linkbudget: interrupted", err=True)
    raise SystemExit(128 + signum)


def main():
    """Console-script entry point."""
    signal.signal(signal.SIGINT, _interrupted)
    try:
        app()
    except SystemExit:
        raise
    except Exception as error:  # a bug: say so plainly, with exit code 3
        import traceback

        traceback.print_exc()
        typer.echo(f"linkbudget: internal error ({type(error).__name__}); this is a bug, please report it",
                   err=True)
        sys.exit(EXIT_BUG)
