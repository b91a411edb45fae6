"""The template's native charts, two per printed page of the Charts sheet.

1. Empirical vs fitted CDF (from ERRDIST_EMPIRICAL on the Fit check sheet);
2. histogram vs fitted density (FREQUENCY counts as densities, ERRDIST_PDF and the normal
   density at the bin midpoints);
3. QQ plot: fitted quantiles against the sorted returns, with the 45° line;
4. the loss tail on a log scale: probability of a loss of at least x, empirical, fitted
   error law, fitted skewed law and normal (the tail is where VaR lives);
5. returns against the rolling VaR, exceptions marked as red columns (Backtest sheet).

Charts are XlsxWriter chart specifications (:class:`~errdist.workbook.layout.ChartSpec`); their
data caches come from the cached values the writer puts in the source cells.
"""

from __future__ import annotations

from collections.abc import Mapping

from errdist.workbook.layout import ChartSpec, SheetPlan, absref

CHARTS_PER_PAGE = 2
"""Charts on one printed page of the Charts sheet (portrait A4, one above the other)."""
ROWS_PER_CHART = 35
"""Rows of the Charts sheet per chart: its caption, the chart (``CHART_SIZE``), a gap."""
ROWS_PER_PAGE = 2 + CHARTS_PER_PAGE * ROWS_PER_CHART
"""Rows of the Charts sheet per printed page (the first two hold the sheet's title)."""
CHART_SIZE = (1000, 640)
"""Chart size in pixels (width, height)."""

_GRID = {"visible": True, "line": {"color": "#D9D9D9", "width": 0.5}}
_AXIS_FONT = {"size": 9}


def _axis(name: str, num_format: str = "General", **extra: object) -> dict[str, object]:
    axis: dict[str, object] = {
        "name": name,
        "name_font": {"size": 10, "bold": False},
        "num_font": _AXIS_FONT,
        "num_format": num_format,
        "major_gridlines": _GRID,
        "label_position": "low",
    }
    axis.update(extra)
    return axis


def _ecdf(keys: Mapping[str, str], fitcheck: str) -> ChartSpec | None:
    if "emp_first_row" not in keys:
        return None
    a, b = keys["emp_first_row"], keys["emp_last_row"]
    x = "=" + absref(fitcheck, f"L{a}", f"L{b}")
    return ChartSpec(
        anchor="",
        chart_type={"type": "scatter", "subtype": "straight"},
        title="Empirical vs fitted distribution function",
        series=[
            {
                "name": "Empirical (plotting positions)",
                "categories": x,
                "values": "=" + absref(fitcheck, f"M{a}", f"M{b}"),
                "marker": {
                    "type": "circle",
                    "size": 3,
                    "border": {"color": "#2F5597"},
                    "fill": {"color": "#9DC3E6"},
                },
                "line": {"none": True},
            },
            {
                "name": "Fitted error distribution",
                "categories": x,
                "values": "=" + absref(fitcheck, f"N{a}", f"N{b}"),
                "marker": {"type": "none"},
                "line": {"color": "#C00000", "width": 2},
            },
        ],
        x_axis=_axis("Daily log return", "0.0%", crossing="min"),
        y_axis=_axis("Cumulative probability", "0.0", min=0, max=1, major_unit=0.1),
        size=CHART_SIZE,
    )


def _histogram(keys: Mapping[str, str], fitcheck: str) -> ChartSpec | None:
    if "hist_first" not in keys:
        return None
    a, b = keys["hist_first"], keys["hist_last"]
    cats = "=" + absref(fitcheck, f"D{a}", f"D{b}")
    return ChartSpec(
        anchor="",
        chart_type={"type": "column"},
        title="Histogram of returns vs fitted density",
        series=[
            {
                "name": "Observed density (histogram)",
                "categories": cats,
                "values": "=" + absref(fitcheck, f"F{a}", f"F{b}"),
                "fill": {"color": "#BDD7EE"},
                "border": {"color": "#5B9BD5"},
                "gap": 10,
            },
        ],
        secondary_type={"type": "line"},
        secondary_series=[
            {
                "name": "Fitted error distribution",
                "categories": cats,
                "values": "=" + absref(fitcheck, f"G{a}", f"G{b}"),
                "line": {"color": "#C00000", "width": 2},
                "marker": {"type": "none"},
                "smooth": False,
            },
            {
                "name": "Normal, same mean and sd",
                "categories": cats,
                "values": "=" + absref(fitcheck, f"H{a}", f"H{b}"),
                "line": {"color": "#404040", "width": 1.25, "dash_type": "dash"},
                "marker": {"type": "none"},
            },
        ],
        x_axis=_axis(
            "Bin midpoint (daily log return)",
            "0.0%",
            interval_unit=3,
            major_gridlines={"visible": False},
        ),
        y_axis=_axis("Density"),
        size=CHART_SIZE,
    )


def _qq(keys: Mapping[str, str], fitcheck: str) -> ChartSpec | None:
    if "emp_first_row" not in keys or "qq_line" not in keys:
        return None
    a, b = keys["emp_first_row"], keys["emp_last_row"]
    line = keys["qq_line"]
    return ChartSpec(
        anchor="",
        chart_type={"type": "scatter"},
        title="QQ plot: returns against fitted quantiles",
        series=[
            {
                "name": "Sorted returns",
                "categories": "=" + absref(fitcheck, f"O{a}", f"O{b}"),
                "values": "=" + absref(fitcheck, f"L{a}", f"L{b}"),
                "marker": {
                    "type": "circle",
                    "size": 3,
                    "border": {"color": "#2F5597"},
                    "fill": {"color": "#9DC3E6"},
                },
            },
            {
                "name": "45° line (perfect fit)",
                "categories": "=" + line,
                "values": "=" + line,
                "marker": {"type": "none"},
                "line": {"color": "#C00000", "width": 2},
            },
        ],
        x_axis=_axis("Fitted quantile (error distribution)", "0.0%", crossing="min"),
        y_axis=_axis("Sorted daily log return", "0.0%"),
        size=CHART_SIZE,
    )


def _returns_var(keys: Mapping[str, str], backtest: str) -> ChartSpec | None:
    if "bt_first" not in keys:
        return None
    a, b = keys["bt_first"], keys["bt_last"]
    cats = "=" + absref(backtest, f"A{a}", f"A{b}")
    return ChartSpec(
        anchor="",
        chart_type={"type": "line"},
        title="Daily returns against the rolling 99% VaR, exceptions marked",
        series=[
            {
                "name": "Daily log return",
                "categories": cats,
                "values": "=" + absref(backtest, f"B{a}", f"B{b}"),
                "line": {"color": "#8FAADC", "width": 0.75},
                "marker": {"type": "none"},
            },
            {
                "name": "−VaR 99% (rolling 250 days)",
                "categories": cats,
                "values": "=" + absref(backtest, f"F{a}", f"F{b}"),
                "line": {"color": "#C00000", "width": 1.5},
                "marker": {"type": "none"},
            },
        ],
        # Exceptions as thin red columns down to the return (0 on other days: no column),
        # which every spreadsheet program draws the same way.
        secondary_type={"type": "column"},
        secondary_series=[
            {
                "name": "Exception (loss beyond VaR)",
                "categories": cats,
                "values": "=" + absref(backtest, f"E{a}", f"E{b}"),
                "fill": {"color": "#FF0000"},
                "border": {"none": True},  # a border would draw the zero days as a line
                "gap": 0,
            },
        ],
        x_axis=_axis(
            "Date",
            "mmm yyyy",
            date_axis=True,
            major_unit=3,
            major_unit_type="months",
            major_gridlines={"visible": False},
        ),
        y_axis=_axis("Daily log return", "0.0%"),
        size=CHART_SIZE,
    )


def _tail(keys: Mapping[str, str], fitcheck: str) -> ChartSpec | None:
    if "tail_first" not in keys:
        return None
    a, b = keys["tail_first"], keys["tail_last"]
    x = "=" + absref(fitcheck, f"T{a}", f"T{b}")
    series: list[dict[str, object]] = [
        {
            "name": "Empirical (plotting positions)",
            "categories": x,
            "values": "=" + absref(fitcheck, f"U{a}", f"U{b}"),
            "marker": {
                "type": "circle",
                "size": 4,
                "border": {"color": "#2F5597"},
                "fill": {"color": "#9DC3E6"},
            },
            "line": {"none": True},
        },
        {
            "name": "Fitted error distribution",
            "categories": x,
            "values": "=" + absref(fitcheck, f"V{a}", f"V{b}"),
            "marker": {"type": "none"},
            "line": {"color": "#C00000", "width": 2},
        },
    ]
    if "tail_skewed" in keys:
        series.append(
            {
                "name": "Fitted skewed error law",
                "categories": x,
                "values": "=" + absref(fitcheck, f"W{a}", f"W{b}"),
                "marker": {"type": "none"},
                "line": {"color": "#ED7D31", "width": 1.75, "dash_type": "long_dash"},
            }
        )
    series.append(
        {
            "name": "Normal, same mean and sd",
            "categories": x,
            "values": "=" + absref(fitcheck, f"X{a}", f"X{b}"),
            "marker": {"type": "none"},
            "line": {"color": "#404040", "width": 1.25, "dash_type": "dash"},
        }
    )
    return ChartSpec(
        anchor="",
        chart_type={"type": "scatter", "subtype": "straight"},
        title="Loss tail: probability of a daily loss of at least x (log scale)",
        series=series,
        x_axis=_axis("Daily loss x (minus the log return)", "0.0%", crossing="min"),
        y_axis=_axis("P(loss ≥ x)", "0.0E+0", log_base=10, crossing="min"),
        size=CHART_SIZE,
    )


def add_charts(
    sp: SheetPlan, keys: Mapping[str, str], *, fitcheck: str, backtest: str, fund: str
) -> None:
    """Lay out the chart pages on the Charts sheet ``sp``, two charts per printed page."""
    sp.width("A", 9, "P")
    sp.text("A1", f"Charts — {fund}", "title")
    specs = [
        c
        for c in (
            _ecdf(keys, fitcheck),
            _histogram(keys, fitcheck),
            _qq(keys, fitcheck),
            _tail(keys, fitcheck),
            _returns_var(keys, backtest),
        )
        if c is not None
    ]
    breaks = []
    for i, spec in enumerate(specs):
        page, slot = divmod(i, CHARTS_PER_PAGE)
        if page and not slot:
            breaks.append(page * ROWS_PER_PAGE)
        top = page * ROWS_PER_PAGE + 1 + slot * ROWS_PER_CHART  # 0-based caption row - 1
        spec.anchor = f"A{top + 3}"
        sp.text(f"A{top + 2}", f"Chart {i + 1} of {len(specs)}: {spec.title}", "label_b")
        sp.charts.append(spec)
    sp.page_breaks = breaks
    sp.fit_width = True
    pages = max(1, -(-len(specs) // CHARTS_PER_PAGE))
    sp.print_area = f"A1:P{pages * ROWS_PER_PAGE}"
