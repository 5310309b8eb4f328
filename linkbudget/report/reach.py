"""The answer of ``linkbudget reach`` as text for a terminal and as JSON (schema ``linkbudget.reach/1``).

Both read a :class:`linkbudget.reach.Reach` and compute nothing of their own.
"""

from linkbudget import __version__
from linkbudget.reach import LIMITED, NEVER_LIMITS
from linkbudget.report.json import json_text
from linkbudget.report.statistics_table import yield_percent
from linkbudget.report.summary import fixed
from linkbudget.text import escaped, length_text, nm, wavelength_text

SCHEMA = "linkbudget.reach/1"

def value_text(target, value):
    """The varied key's value in the unit that reads best: a length, a count, dBm or dB."""
    unit = target.bounds.unit
    if target.whole:
        return f"{int(value)}"
    if unit in ("nm", "um", "mm", "m", "km"):
        return length_text(value) if value < 1e3 else f"{value / 1e3:.6g} km"
    return f"{value:.6g} {unit}".strip()


def _internal_unit(target):
    unit = target.bounds.unit
    return "" if target.whole else "m" if unit in ("nm", "um", "mm", "m", "km") else unit


def _current_text(target):
    """The key's value in the link: one value, or its typical value and the ends of its spread."""
    if not target.current_ends:
        return value_text(target, target.current)
    low, high = (value_text(target, end) for end in target.current_ends)
    return f"{value_text(target, target.current)} typ, from {low} to {high} (the search gives it one value)"


def _what(target):
    return "smallest" if target.smallest else "largest"


def _yield_of(slack):
    """The :class:`~linkbudget.reach_yield.YieldSlack` fields of a search at a stated yield, or ``None``."""
    return slack if hasattr(slack, "stated_yield") else None


def _criterion_text(slack):
    """How the link is said to close: in the worst case, or in a share of the trials."""
    at_yield = _yield_of(slack)
    if at_yield is None:
        return "in the worst case"
    return (f"in at least {yield_percent(at_yield.stated_yield)} of {at_yield.trials} trials "
            f"(seed {at_yield.seed})")


def _margin_name(slack):
    return "worst-case margin" if _yield_of(slack) is None else "margin at the yield's edge"


def _limit_reason(slack, required_margin_db, wavelength_m):
    where = nm(wavelength_m[slack.wavelength_index])
    if _yield_of(slack) is not None:
        what = "overload" if slack.limited_by == "overload" else "sensitivity"
        return (f"the receiver {what} (past the limit fewer than {yield_percent(slack.stated_yield)} of the "
                f"trials close; the trial at the yield's edge fails at {where})")
    if slack.limited_by == "overload":
        return f"the receiver overload (the best-case received power exceeds it at {where})"
    return (f"the receiver sensitivity (the worst-case margin falls below the required "
            f"{fixed(required_margin_db)} dB at {where})")


def reach_text(reach):
    """The answer in a few lines of plain text."""
    target, slack = reach.target, reach.slack
    label = escaped(target.label)
    where = nm(reach.wavelength_m[slack.wavelength_index])
    margin_name = _margin_name(slack)
    lines = [f"Reach of {label}: the {_what(target)} value at which the link still closes {_criterion_text(slack)} "
             f"(required margin {fixed(reach.required_margin_db)} dB)",
             f"  in the link: {_current_text(target)}",
             f"  searched:    {target.bounds.text()} (the valid range of {target.bounds.what})"]
    if reach.outcome == LIMITED:
        lines += [f"  limit:       {value_text(target, reach.value)}: {margin_name} "
                  f"{fixed(slack.margin_db, signed=True)} dB at {where}{_closing_text(slack)}",
                  f"  limited by:  {_limit_reason(reach.failing, reach.required_margin_db, reach.wavelength_m)}"]
    elif reach.outcome == NEVER_LIMITS:
        lines.append(f"  never limits: the link still closes at {value_text(target, reach.value)}, the end of "
                     f"the valid range ({margin_name} {fixed(slack.margin_db, signed=True)} dB at {where}"
                     f"{_closing_text(slack)})")
    else:
        lines.append(f"  never closes: no value in the range closes the link; closest at "
                     f"{value_text(target, reach.value)}{_closing_text(slack)}, short by {fixed(-slack.slack_db)} dB, "
                     "limited by "
                     f"{_limit_reason(slack, reach.required_margin_db, reach.wavelength_m)}")
    return "\n".join(lines) + "\n"


def _closing_text(slack):
    """The share of the trials that close, after a search at a stated yield."""
    at_yield = _yield_of(slack)
    return "" if at_yield is None else f"; {yield_percent(at_yield.yield_fraction)} of the trials close"


def reach_dict(reach):
    """The answer as the JSON document of schema :data:`SCHEMA`."""
    target, slack = reach.target, reach.slack

    def rounded(value):
        return round(float(value), 9) + 0.0

    limiting = reach.failing if reach.outcome == LIMITED else slack
    answer = {
        "schema": SCHEMA,
        "tool_version": __version__,
        "vary": target.label,
        "answer": _what(target),
        "outcome": reach.outcome,
        "unit": _internal_unit(target),
        "value_in_link": rounded(target.current),
        "spread_in_link": [rounded(end) for end in target.current_ends] or None,
        "limit": (int(reach.value) if target.whole else rounded(reach.value)) if reach.outcome == LIMITED else None,
        "value": int(reach.value) if target.whole else rounded(reach.value),
        "valid_range": {"low": target.bounds.low, "high": target.bounds.high},
        "required_margin_db": rounded(reach.required_margin_db),
        "worst_margin_db": rounded(slack.margin_db),
        "slack_db": rounded(slack.slack_db),
        "limiting_wavelength_nm": float(wavelength_text(reach.wavelength_m[limiting.wavelength_index])),
        "limited_by": limiting.limited_by if reach.outcome != NEVER_LIMITS else None,
    }
    at_yield = _yield_of(slack)
    if at_yield is not None:
        answer.update(trials=at_yield.trials, seed=at_yield.seed, stated_yield=rounded(at_yield.stated_yield),
                      yield_at_value=rounded(at_yield.yield_fraction))
    return answer


def reach_json(reach):
    """:func:`reach_dict` as JSON text with a final newline."""
    return json_text(reach_dict(reach))

