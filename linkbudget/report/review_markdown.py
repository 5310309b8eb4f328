"""The Markdown section of a link's review: eye safety at the reachable points, back reflection
and polarization-dependent loss, for a pull-request comment (estimates; the cautions follow)."""


from linkbudget.report import review_text as words


def review_lines(result, table, shown):
    """The section's Markdown lines; ``table`` builds a Markdown table, ``shown`` escapes user text."""
    if result.review is None:
        return []
    rows = []
    for item in result.review.assessments:
        name, *cells, level = words.point_cells(result, item)
        rows.append([shown(name), *cells, f"**{level}**" if item.above_level_1 else level])
    lines = ["", "Eye safety at reachable points (estimates):", ""]
    lines += table(words.POINT_HEADERS, rows, text_columns=3)
    lines += ["", words.LIMITS_SENTENCE, ""]
    lines += [f"- {'**' + sentence + '**' if alarm else sentence}" for sentence, alarm in
              (*words.safety_sentences(result, shown), *words.back_reflection_sentences(result, shown))]
    lines += [f"- {words.polarization_sentence(result, shown)}"]
    return lines
