"""The terminal section of a statistical budget: margin quantiles per wavelength, the yield, and
the rows that drive the margin's spread."""

from rich import box
from rich.table import Table
from rich.text import Text

from linkbudget.report.summary import fixed
from linkbudget.text import escaped, nm

#: Wavelengths listed in the table (the ones with the least margin at the smallest probability).
MAX_LISTED_WAVELENGTHS = 8
#: The quantiles shown (the JSON holds every one computed).
SHOWN_PROBABILITIES = (0.001, 0.01, 0.5)
#: Rows listed by their share of the margin variance.
MAX_LISTED_CONTRIBUTIONS = 6


def _percent(fraction):
    """A probability as a percentage with the digits a small one needs."""
    return f"{100 * float(fraction):.3g} %"


def yield_percent(fraction):
    """A yield as a percentage to a thousandth of a percent (99.920 %, so 99.9 % is never rounded up to)."""
    return f"{100 * float(fraction):.3f} %"


def quantile_rows(result):
    """(headers, rows, caption) of the quantile table as text: margin mean, σ, quantiles and the two
    probabilities per listed wavelength, with the RSS estimate. A header's two lines are split by a
    newline (a one-line format joins them with a space)."""
    stats = result.statistics
    probabilities = [p for p in SHOWN_PROBABILITIES if p in stats.margin_quantiles_db]
    smallest = probabilities[0]
    headers = ["wavelength", "mean", "std", *(f"{100 * p:g} %" for p in probabilities),
               f"RSS\n{100 * smallest:g} %", "P\n(short)"]
    if stats.probability_overload is not None:
        headers.append("P\n(overload)")
    order = stats.margin_quantiles_db[smallest].argsort(kind="stable")[:MAX_LISTED_WAVELENGTHS]
    rows = []
    for index in sorted(order):
        cells = [nm(result.wavelength_m[index]), fixed(stats.margin_mean_db[index], signed=True),
                 fixed(stats.margin_std_db[index], 3),
                 *(fixed(stats.margin_quantiles_db[p][index], signed=True) for p in probabilities),
                 fixed(stats.rss_quantiles_db[smallest][index], signed=True),
                 _percent(stats.probability_below_required[index])]
        if stats.probability_overload is not None:
            cells.append(_percent(stats.probability_overload[index]))
        rows.append(cells)
    caption = (f"quantiles of the margin; RSS: nominal margin + z·√(Σ row σ²), rows taken as independent; "
               f"short: below the required {fixed(result.required_margin_db)} dB")
    if result.wavelength_m.size > MAX_LISTED_WAVELENGTHS:
        caption += (f"; the {MAX_LISTED_WAVELENGTHS} tightest of {result.wavelength_m.size} wavelengths "
                    "(--format json lists all)")
    return headers, rows, caption


def quantile_title(result):
    stats = result.statistics
    return f"Statistical budget: {stats.trials} trials, seed {stats.seed} (margin in dB)"


def quantile_table(result):
    """:func:`quantile_rows` as a terminal table."""
    headers, rows, caption = quantile_rows(result)
    table = Table(title=quantile_title(result), title_justify="left", box=box.SIMPLE_HEAD)
    for header in headers:
        table.add_column(header, justify="right", no_wrap=True)
    for cells in rows:
        table.add_row(*cells)
    table.caption = caption
    return table


#: Headers of the contribution table.
CONTRIBUTION_HEADERS = ("segment", "std dB", "share of variance")


def contribution_rows(result):
    """(segment name as written, its σ, its share) of the rows with the largest share of the margin
    variance at the governing wavelength; the name is user text for the caller to escape."""
    stats = result.statistics
    index = stats.governing_index
    return [(item.name, fixed(item.std_db[index], 3), _percent(item.share[index]))
            for item in stats.contributions[:MAX_LISTED_CONTRIBUTIONS]]


def contribution_title(result):
    return f"What spreads the margin at {nm(result.wavelength_m[result.statistics.governing_index])}"


def contribution_table(result):
    """:func:`contribution_rows` as a terminal table."""
    table = Table(title=contribution_title(result), title_justify="left", box=box.SIMPLE_HEAD)
    for header, justify in zip(CONTRIBUTION_HEADERS, ("left", "right", "right"), strict=True):
        table.add_column(header, justify=justify)
    for name, std_text, share_text in contribution_rows(result):
        table.add_row(Text(escaped(name)), std_text, share_text)
    return table


def yield_sentence(result):
    """One sentence: the share of trials in which the link closes at every wavelength."""
    stats = result.statistics
    return (f"Yield: the link closes (margin >= {fixed(result.required_margin_db)} dB, no overload) at every "
            f"wavelength in {yield_percent(stats.yield_fraction)} of {stats.trials} trials.")


def statistics_section(result):
    """The renderables of the statistical budget, or none when no trials were asked."""
    if result.statistics is None:
        return []
    parts = [quantile_table(result), Text(yield_sentence(result))]
    if result.statistics.contributions:
        parts.append(contribution_table(result))
    return parts


def yield_check_line(result, path, least_yield):
    """The CI gate's line for one link gated on its yield: PASS or FAIL, the yield against the
    least one asked for, and the margin at the smallest quantile."""
    stats = result.statistics
    smallest = next(iter(stats.margin_quantiles_db))
    word = "PASS " if stats.yield_fraction >= least_yield else "FAIL "
    quantile = float(stats.margin_quantiles_db[smallest].min())
    return (f"{word}  {escaped(path)}: yield {yield_percent(stats.yield_fraction)} "
            f"(at least {yield_percent(least_yield)} asked; {stats.trials} trials, seed {stats.seed}), "
            f"{100 * smallest:g} % margin "
            f"{fixed(quantile, signed=True)} dB, required {fixed(result.required_margin_db)} dB")
