"""The command line: a thin Typer app wiring config, engine and reports together.

Exit codes, for every command: 0 the link closes / the command succeeded; 1 a link does not
meet its margin or overload; 2 the input is wrong; 3 an internal error (a bug).
"""

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
             "3 an internal error, a bug: please report it.")

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


#: The option of every command that loads links: a folder outside the project a link may read from.
AllowPath = Annotated[list[Path] | None, typer.Option(
    "--allow-path", metavar="DIR",
    help="Let the links read files (materials) in this folder outside their project; repeatable.")]


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


def _margin_override(text):
    return _ratio_option("--min-margin", text, lower=0.0, what="a required margin")


def _hazard_level_option(text):
    if text is None:
        return None
    from linkbudget.gates import hazard_level_option

    try:
        return hazard_level_option(text)
    except ValueError as error:
        _fail_input(f"--max-hazard-level: {error}")


def _ratio_option(option, text, *, what, lower=None, upper=None):
    """A dB option's value (``what`` it is, for the message), at least ``lower`` or at most
    ``upper`` [dB], or exit 2 with a message."""
    if text is None:
        return None
    from linkbudget.units import UnitError, parse_quantity

    try:
        value_db = parse_quantity(text, "ratio")
    except UnitError as error:
        _fail_input(f"{option}: {error}{format_hint(error.hint)}")
    if lower is not None and value_db < lower or upper is not None and value_db > upper:
        bound = f">= {lower:g} dB" if lower is not None else f"<= {upper:g} dB"
        _fail_input(f"{option}: {what} is {bound}, got {text!r}")
    return value_db


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


def _report_text(result, output_format):
    """The report in one of the file formats (terminal output as plain text): a string, or for
    JSON an iterator of its pieces, so that a large sweep is streamed, never one string."""
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
    output: Annotated[
        Path | None, typer.Option("--output", "-o", metavar="FILE", help="Write to this file instead of the terminal.")
    ] = None,
    force: Annotated[bool, typer.Option("--force", help="Replace an existing --output file.")] = False,
    min_margin: Annotated[
        str | None, typer.Option("--min-margin", metavar="MARGIN", help="Override the required margin, e.g. '3 dB'.")
    ] = None,
    allow_path: AllowPath = None,
):
    """Print the budget of one link: every segment, received power, margins, verdict.

    Exit status 0 the link closes, 1 it does not, 2 the input is wrong, 3 a bug.
    """
    loaded, result = _evaluated(link, allow_path or (), _margin_override(min_margin))
    _emit(result, output_format, output, force, protected=[link, *loaded.referenced_files])
    raise typer.Exit(EXIT_OK if result.closes else EXIT_FAILS)


def _emit(result, output_format, output, force, protected):
    if output is None and output_format is Format.terminal:
        from rich.console import Console

        from linkbudget.report.terminal import render

        Console().print(render(result))
        return
    text = _report_text(result, output_format)
    if output is None:
        sys.stdout.writelines([text] if isinstance(text, str) else text)
        return
    from linkbudget.report.output import OutputError, write_atomic

    try:
        write_atomic(output, text, overwrite=force, protected=protected)
    except OutputError as error:
        _fail_input(str(error))


@app.command(cls=_Command)
def check(
    links: Annotated[list[Path], typer.Argument(metavar="LINK", help="One or more link files.")],
    min_margin: Annotated[str | None, typer.Option(
        "--min-margin", metavar="MARGIN",
        help="Required worst-case margin for every file, e.g. '3dB' (overrides each file's own).")
    ] = None,
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
):
    """The CI gate: one line per link, exit 0 only if every link closes and passes the gates asked for.

    Exit status 0 every link passes, 1 one does not, 2 an input is wrong, 3 a bug.
    """
    from linkbudget.config import ConfigError, load_link
    from linkbudget.engine import evaluate
    from linkbudget.gates import gate_failures
    from linkbudget.report.summary import check_error_line, check_line, check_summary

    required = _margin_override(min_margin)
    gates = {"max_hazard_level": _hazard_level_option(max_hazard_level),
             "max_back_reflection_db": _ratio_option("--max-back-reflection", max_back_reflection, upper=0.0,
                                                     what="a back reflection, a fraction of the launch,"),
             "max_pdl_db": _ratio_option("--max-pdl", max_pdl, lower=0.0, what="a polarization-dependent loss")}
    closes = fails = broken = gated = 0
    for path in links:
        try:
            result = evaluate(load_link(path, allow_path or ()), required_margin_db=required)
        except ConfigError as error:
            broken += 1
            typer.echo(check_error_line(path), err=False)
            typer.echo(str(error), err=True)
            continue
        failures = gate_failures(result, **gates)
        typer.echo(check_line(result, path, failures))
        closes += result.closes
        fails += not result.closes
        gated += bool(failures)
    typer.echo(check_summary(len(links), closes, fails, broken, gated))
    raise typer.Exit(EXIT_INPUT if broken else EXIT_FAILS if fails or gated else EXIT_OK)


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
