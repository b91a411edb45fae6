"""The words on the template's Guide sheet.

Kept apart from the layout code so the text can be read and reviewed in one place. Each block is
a (style, text) pair; the builder writes one block per row. Styles: ``"h2"`` a section heading,
``"wrap"`` a paragraph, ``"bullet"`` a list item, ``"step"`` a numbered step.
"""

from __future__ import annotations

PURPOSE: list[tuple[str, str]] = [
    ("h2", "What this workbook does"),
    (
        "wrap",
        'It fits the generalized normal ("error") distribution to the fund\'s daily log '
        "returns, turns the fit into Value at Risk and Expected Shortfall, checks how well the "
        "law fits, and backtests a rolling one-day VaR against the returns that followed. "
        "Every figure is a live formula: the ERRDIST_ worksheet functions of the errdist add-in "
        "and the spreadsheet's own built-in functions.",
    ),
    (
        "wrap",
        "The workbook is saved with every result already calculated, so it can be read in any "
        "spreadsheet program even where the add-in is not installed; without the add-in the "
        "ERRDIST_ cells show #NAME? as soon as the program recalculates them.",
    ),
]

SHEETS: list[tuple[str, str]] = [
    ("h2", "The sheets"),
    (
        "bullet",
        "Prices — the input: one row per business day, date and closing price, oldest "
        "first (yellow cells).",
    ),
    ("bullet", "Returns — daily log returns from the prices (ERRDIST_RETURNS)."),
    (
        "bullet",
        "Calibration — sample statistics, the fit by moments and by maximum likelihood "
        "side by side, the fit report, and the moments fit re-derived with built-in functions "
        "only (a check that needs no add-in).",
    ),
    (
        "bullet",
        "Models — the skewed error law (a wider loss side than gain side allowed) and two "
        "conditional volatility models, GJR-GARCH and EWMA, with every parameter and its "
        "standard error; the yellow cell picks the model of today's figures.",
    ),
    (
        "bullet",
        "Risk — today's one-day VaR and Expected Shortfall by model (symmetric law, skewed "
        "law, conditional model) and one-day and ten-day figures at 95%, 97.5%, 99% and 99.5% "
        "for the fitted law and for the normal law with the same mean and standard deviation.",
    ),
    (
        "bullet",
        "Fit check — goodness-of-fit test, the comparison with rival laws, and the "
        "tables behind the charts.",
    ),
    (
        "bullet",
        "Forecasts — rolling one-day VaR and ES of four models (error law, skewed law, "
        "EWMA, GJR-GARCH), each day from the returns before it only, and each model's "
        "backtests over the last 250 days.",
    ),
    (
        "bullet",
        "Backtest — the rolling 250-day 99% VaR, its exceptions, the coverage tests "
        "and the traffic-light zone; and the four models side by side with a verdict each.",
    ),
    (
        "bullet",
        "Charts — empirical vs fitted distribution, histogram vs fitted density, "
        "QQ plot, the loss tail on a log scale, and returns against the rolling VaR.",
    ),
    (
        "bullet",
        "xlwings.conf — tells the add-in which Python module holds the functions. "
        "Leave it as it is.",
    ),
]

REFRESH: list[tuple[str, str]] = [
    ("h2", "Each month"),
    (
        "step",
        "1. Get the fund's daily prices up to the last business day of the month (a CSV "
        "or .xlsx file with a date column and a price column).",
    ),
    (
        "step",
        "2. Rebuild the workbook from them with the errdist command, which recalculates "
        "every cell and saves the results with the file:  errdist refresh --prices "
        "prices.csv --out risk-2026-12.xlsx",
    ),
    (
        "step",
        "3. Open the new workbook. Read the Calibration sheet first (is the shape "
        "plausible? do the two fits agree?), then Fit check, Risk and Backtest.",
    ),
    (
        "step",
        "4. Audit it when needed: errdist check risk-2026-12.xlsx recalculates every "
        "formula and lists any cell whose saved value differs.",
    ),
    (
        "wrap",
        "Working inside the spreadsheet instead: with the add-in installed, paste the new "
        "prices over the yellow cells of the Prices sheet keeping the same number of rows "
        "(drop the oldest rows as you add the newest), then recalculate. The ranges in the "
        "formulas are fixed, so a different number of rows needs the errdist refresh command.",
    ),
]

INSTALL: list[tuple[str, str]] = [
    ("h2", "Live formulas: installing the add-in (summary — see docs/install.md)"),
    (
        "wrap",
        "You need none of this to read the figures: errdist saved every result with the file. "
        "The add-in is for recalculating inside the spreadsheet after you change a yellow cell.",
    ),
    (
        "step",
        "1. Install Python 3.10 or later and the package:  pip install errdist  (from your "
        "firm's package index)\n    or, in a clone of the errdist repository:  pip install .",
    ),
    (
        "step",
        "2. Excel on Windows: install the xlwings add-in  (xlwings addin install)  and set its "
        "Interpreter to your environment's python.exe on the xlwings ribbon tab.",
    ),
    (
        "step",
        "3. Bring the ERRDIST_ functions into Excel. errdist writes this book as .xlsx, with no macros, "
        "so the functions do not come with it (the xlwings.conf sheet only names the Python "
        "module, errdist.sheet.xlwings_udfs). Import Functions on the xlwings tab, or import "
        "the file from  errdist vba  in the VBA editor, then save the book as .xlsm.",
    ),
    (
        "step",
        "4. Each month errdist refresh writes a new .xlsx, again without the functions. To "
        "import them only once, put them in an Excel add-in: import them into an empty "
        "book, save it as .xlam and tick it under File > Options > Add-ins (docs/install.md).",
    ),
    (
        "step",
        "5. Recalculate (Ctrl+Alt+F9). Without the functions the saved values stay on screen "
        "until a recalculation, which turns the ERRDIST_ cells into errors (see above).",
    ),
    (
        "step",
        "6. LibreOffice Calc (Linux, Windows, macOS):  errdist libreoffice install  once puts "
        "the functions into your LibreOffice profile; every book, each month's .xlsx included, "
        "then calculates them live.",
    ),
]

CAUTIONS: list[tuple[str, str]] = [
    ("h2", "Cautions — read before relying on any figure"),
    (
        "bullet",
        "Model risk: every VaR, Expected Shortfall, p-value and zone here is computed "
        "under an assumed law. Check the fit every month; figures at 99.5% rest mostly on the "
        "model, not on the data.",
    ),
    (
        "bullet",
        "A symmetric law: the error distribution is symmetric about its location. If "
        "the sample skewness on the Calibration sheet is far from zero, the loss tail may be "
        "understated. The skewed error law (Models sheet) lets the loss side be wider; its skew "
        "is estimated with much less precision than the scale and can change sign from one "
        "window to the next.",
    ),
    (
        "bullet",
        "The i.i.d. assumption: one law for the whole window assumes independent, "
        "identically distributed returns. Real returns cluster in calm and stressed spells, so "
        "VaR reacts late to a change of regime; both ten-day rules rest on this assumption.",
    ),
    (
        "bullet",
        "Conditional figures (GJR-GARCH, EWMA) follow the volatility of the last days: one "
        "large loss raises tomorrow's VaR at once, and a calm spell lowers it. They answer "
        "'how risky is tomorrow', not 'how risky is a typical day'; read both. The models "
        "assume one regime and i.i.d. innovations themselves.",
    ),
    (
        "bullet",
        "Estimation error: the shape estimated from a few hundred returns is uncertain; "
        "the moments fit is sensitive to single extreme returns. The model parameters are "
        "estimates too: see their standard errors on the Models sheet. A backtest that passes "
        "over 250 days is weak evidence: at 99% only about 2.5 exceptions are expected.",
    ),
    (
        "bullet",
        "Repeated returns (stale prices, prices rounded to a tick): the fit report counts "
        "them; when many returns are equal the maximum-likelihood shape stops at its lower "
        "bound 0.1 at the repeated value and the MLE note says so — then do not use its tail "
        "figures; remove stale prices or use weekly returns.",
    ),
    ("bullet", "Not investment advice: this is a calculation tool, not a recommendation."),
    (
        "bullet",
        "Your firm's risk policy and your regulators come first. Confidence levels, "
        "horizons, the 250-day window and the zones here are common defaults; where your policy "
        "or regulator says otherwise, follow them.",
    ),
]

DEMO_NOTE = "The demo fund and its prices are invented and simulated; they are not real data."


def blocks() -> list[tuple[str, str]]:
    """All guide blocks in order."""
    return PURPOSE + SHEETS + REFRESH + INSTALL + CAUTIONS
