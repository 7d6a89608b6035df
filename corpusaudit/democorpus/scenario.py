"""The invented scenario: one coastal research institute, its departments, people and reports.

Everything here is made up: the organisation, the places, the people and every number.
The charts mix deliberate practice breaches with good-practice counterparts, and every
chart type appears at least once as vector and once as raster.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from corpusaudit.democorpus.charts import ChartSpec

ORGANISATION = "Quillmere Institute of Coastal Studies"
DEPARTMENTS = ("Hydrology", "Fisheries", "Outreach", "Finance", "Coastal Geology", "Directorate")
TRUNCATED_FROM = "outreach-schools-2022.pdf"

_FIRST = ("Tamsin", "Baptiste", "Neha", "Osric", "Maren", "Idris", "Lowenna", "Caspar", "Yelena", "Rufus")
_LAST = ("Orrell", "Kellaway", "Brindlecombe", "Talbanne", "Quenby", "Haverleigh", "Mossop", "Pennart",
         "Stroud-Avery", "Wickenden")


@dataclass(frozen=True)
class Placement:
    """How one chart goes into a document.

    source "vector" embeds the chart's PDF page; "raster" renders it at `dpi` and places the
    pixels. scale multiplies the chart's native size on the page, so a raster's effective
    ppi is dpi / scale and its text prints at scale x its point size. tiles > 1 cuts a
    raster into that many horizontal strips placed edge to edge (one visible figure,
    several image objects).
    """

    spec: ChartSpec
    source: str = "vector"
    caption: str = ""  # "" = deliberately uncaptioned; otherwise "Figure N. " is prefixed
    dpi: int = 150
    fmt: str = "png"  # png | png-alpha | jpeg
    scale: float = 1.0
    tiles: int = 1


@dataclass(frozen=True)
class DocumentPlan:
    name: str
    department: str
    year: int
    title: str
    author: str
    blocks: tuple  # paragraphs (str), headings (("h", text)) and Placements, in reading order


@dataclass(frozen=True)
class ImagePlan:
    name: str  # relative to the corpus folder
    department: str
    year: int
    spec: ChartSpec
    fmt: str
    dpi: int


def _walk(seed: int, rows: int, n: int, start: float, step: float) -> tuple[tuple[float, ...], ...]:
    """Rounded random walks: plausible yearly series that never go below 1."""
    rng = np.random.default_rng(seed)
    base = start * (1 + np.arange(rows)[:, None] * 0.35)
    walk = base + np.cumsum(rng.normal(step, start * 0.08, (rows, n)), axis=1)
    return tuple(tuple(float(v) for v in row) for row in np.round(np.maximum(walk, 1.0), 1))


YEARS_10 = tuple(float(y) for y in range(2014, 2024))
MONTHS = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")
STATIONS = tuple(f"Q{i}" for i in range(1, 9))


def _years(a: int, b: int) -> tuple[str, ...]:
    return tuple(str(y) for y in range(a, b + 1))


# --- Hydrology ---------------------------------------------------------------------------
LINE_8_SERIES = ChartSpec(
    "line", title="Mean discharge by catchment", x_values=YEARS_10, value_label="Discharge (m³/s)",
    series=_walk(11, 8, 10, 4.0, 0.2), size_in=(6.0, 3.0),
    series_names=("Ashby Brook", "Carrow", "Deepling", "Fennick", "Gorse Water", "Hallow Beck", "Inchmoor", "Larrow"),
    notes=("line with 8 series and a legend",))
HEATMAP_JET = ChartSpec(
    "heatmap", title="Water temperature by month and station", categories=MONTHS, series_names=STATIONS,
    colormap="jet", value_label="°C", seed=12, size_in=(5.0, 3.5), notes=("rainbow colormap",))
MAP_RECHARGE = ChartSpec(
    "map", title="Groundwater recharge by district", series=((212, 180, 95, 143, 260, 171, 120, 88, 199),),
    colormap="viridis", value_label="Recharge (mm)", seed=13, size_in=(5.0, 3.5))
AREA_ABSTRACTION = ChartSpec(
    "area", variant="stacked", title="Water abstraction by use", x_values=YEARS_10, value_label="Ml/day",
    series=_walk(14, 4, 10, 6.0, 0.3), series_names=("Public supply", "Agriculture", "Industry", "Aquaculture"),
    size_in=(6.0, 3.0), notes=("stacked area with a legend",))
LINE_UNEVEN = ChartSpec(
    "line", title="Mean sea level at Venning gauge", x_values=(2000, 2005, 2010, 2012, 2013, 2014, 2015, 2016),
    even_spacing=True, series=((7012, 7031, 7049, 7055, 7061, 7063, 7070, 7074),), value_label="mm above datum",
    notes=("uneven years drawn evenly spaced",))
LINE_GAPS = ChartSpec(
    "line", title="Spring tide range, irregular surveys", x_values=(2011, 2012, 2015, 2016, 2017, 2021, 2022),
    markers=False, series=((5.2, 5.4, 5.1, 5.6, 5.5, 5.9, 6.0),), value_label="Range (m)",
    notes=("unevenly spaced samples without markers",))
LINE_GOOD = ChartSpec(
    "line", title="Annual rainfall at three gauges", x_values=YEARS_10, direct_labels=True,
    series=_walk(15, 3, 10, 600.0, 5.0), series_names=("Merrow", "Saltcombe", "Tollard"), value_label="mm")
SCATTER_BUBBLE = ChartSpec(
    "scatter", variant="bubble", title="Gauge record length and gaps (bubble: catchment area)", n_points=25,
    seed=17, x_label="Record length (years)", value_label="Missing days per year", notes=("bubble chart",))
HEATMAP_GOOD = ChartSpec(
    "heatmap", title="Dissolved oxygen by month and station", categories=MONTHS, series_names=STATIONS,
    colormap="viridis", value_label="mg/l", seed=16, size_in=(5.0, 3.5))

# --- Fisheries ---------------------------------------------------------------------------
BAR_TRUNCATED = ChartSpec(
    "bar", title="Total landings", categories=_years(2016, 2023), natural_order=True, axis_min=40,
    series=((46, 48, 51, 47, 53, 55, 52, 57),), value_label="Landings (kt)", notes=("axis starts at 40",))
PIE_8_UNSORTED = ChartSpec(
    "pie", title="Landings by species", series=((14, 30, 6, 20, 9, 4, 10, 7),), size_in=(5.0, 3.5),
    categories=("Sprat", "Herring", "Dab", "Mackerel", "Whiting", "Plaice", "Cod", "Skate"),
    notes=("8 slices, unsorted",))
BAR_HARBOURS = ChartSpec(
    "bar", variant="horizontal", title="Vessels registered by harbour", series=((82, 64, 51, 38, 22, 15),),
    categories=("Port Venning", "Saltcombe", "Merrow Quay", "Eddisham", "Tollard Bay", "Cray Haven"),
    value_label="Vessels")
PIE_3D = ChartSpec(
    "pie", title="Catch by gear type", series=((48, 27, 15, 10),), three_d=True,
    categories=("Trawl", "Gill net", "Pots", "Line"), notes=("3D-looking pie",))
SCATTER_DENSE = ChartSpec(
    "scatter", title="Length and mass of sampled sprat", n_points=5000, x_label="Length (cm)",
    value_label="Mass (g)", seed=21, notes=("overplotted scatter with 5000 points",))
SCATTER_GOOD = ChartSpec(
    "scatter", title="Water temperature and larval density", n_points=150, x_label="Temperature (°C)",
    value_label="Larvae per m³", seed=22)
BOX_UNSORTED = ChartSpec(
    "box", title="Cockle density by bed", n_points=40, seed=23, value_label="Cockles per m²",
    categories=("Wrenfold", "Tansy Point", "Blackwater", "Oxley Sands", "Marram Cove"),
    series=((34, 22, 41, 18, 29),), notes=("groups in arbitrary order",))
BOX_AGES = ChartSpec(
    "box", title="Herring length by age class", n_points=40, seed=24, natural_order=True, value_label="Length (cm)",
    categories=("Age 1", "Age 2", "Age 3", "Age 4", "Age 5"), series=((12, 19, 25, 29, 32),))
HIST_GOOD = ChartSpec(
    "histogram", title="Haul duration", n_points=800, seed=25, x_label="Hours", value_label="Hauls")
SCATTER_RED_GREEN = ChartSpec(
    "scatter", variant="groups", title="Bycatch rate against depth", n_points=60, seed=26,
    series_names=("Trawl", "Longline"), palette="red_green", x_label="Depth (m)", value_label="Bycatch (%)",
    notes=("colour-blind-unsafe red/green palette",))
BOX_SEASONS_ROTATED = ChartSpec(
    "box", title="Plaice condition by survey", n_points=35, seed=27, natural_order=True, label_angle=45,
    categories=("Spring survey", "Summer survey", "Autumn survey", "Winter survey"), series=((0.9, 1.0, 1.15, 1.3),),
    value_label="Condition index", notes=("labels rotated 45 degrees",))
BAR_UNSORTED = ChartSpec(
    "bar", title="Discards by species", categories=("Ling", "Pollack", "Bass", "Turbot", "Brill", "Gurnard"),
    series=((12, 31, 8, 22, 17, 5),), value_label="Tonnes", notes=("nominal bars in arbitrary order",))

# --- Outreach ----------------------------------------------------------------------------
BAR_ROTATED = ChartSpec(
    "bar", title="Attendance by event", series=((920, 740, 610, 450, 300, 180),), label_angle=45,
    categories=("Rockpool rambles", "Estuary open day", "Seal watch cruise", "Schools science fair",
                "Beach clean weekend", "Evening seminars"),
    value_label="Visitors", size_in=(5.0, 3.5), notes=("labels rotated 45 degrees",))
DONUT_ORIGIN = ChartSpec(
    "pie", variant="donut", title="Visitors by origin", series=((45, 30, 15, 10),),
    categories=("Local", "Regional", "National", "Overseas"), size_in=(4.0, 3.0))
LINE_ON_CATEGORIES = ChartSpec(
    "line", title="Litter collected by habitat", categories=("Harbour", "Dunes", "Marsh", "Cliffs", "Estuary"),
    series=((42, 18, 25, 9, 31),), value_label="Bags", notes=("line joining nominal categories",))
FLOW_SAMPLES = ChartSpec(
    "not_chart", variant="flow", title="How a water sample is handled",
    categories=("Sample collected", "Field log", "Lab analysis", "Quality review", "Data archive"),
    size_in=(6.0, 2.5), tick_pt=8.0)
PIE_TOTAL_WRONG = ChartSpec(
    "pie", title="How visitors heard of us", series=((38, 26, 18, 12, 6),), percent_labels=True, percent_offset=4,
    categories=("Word of mouth", "Website", "Social media", "Posters", "Radio"), size_in=(5.0, 3.5),
    notes=("labelled percentages sum to 104",))
BAR_RED_GREEN = ChartSpec(
    "bar", variant="grouped", title="Members and volunteers", categories=_years(2019, 2023), natural_order=True,
    series=((120, 135, 150, 158, 171), (64, 70, 92, 97, 110)), series_names=("Members", "Volunteers"),
    palette="red_green", value_label="People", notes=("colour-blind-unsafe red/green palette",))
BAR_LIGHT_TEXT = ChartSpec(
    "bar", title="Newsletter subscribers by channel", categories=("Email", "Post", "App", "Noticeboard"),
    series=((2400, 1300, 800, 250),), text_colour="#BBBBBB", value_label="Subscribers",
    notes=("light grey text on white",))
LINE_TINY_TICKS = ChartSpec(
    "line", title="Website visits", x_values=YEARS_10, series=_walk(31, 1, 10, 5000.0, 400.0),
    value_label="Visits", tick_pt=4.0, notes=("tiny 4 pt tick labels",))
AREA_SCHOOLS = ChartSpec(
    "area", variant="stacked", title="School visits by key stage", x_values=YEARS_10, value_label="Pupils",
    series=_walk(32, 6, 10, 80.0, 4.0), size_in=(6.0, 3.0),
    series_names=("Nursery", "Infant", "Junior", "Lower secondary", "Upper secondary", "College"),
    notes=("stacked area with 6 series and a legend",))
STACK_3_SCHOOLS = ChartSpec(
    "bar", variant="stacked", title="Workshops by format", categories=_years(2019, 2023), natural_order=True,
    series=((12, 15, 9, 18, 21), (6, 8, 11, 10, 12), (3, 4, 4, 6, 7)),
    series_names=("On site", "In school", "Online"), value_label="Workshops", size_in=(5.5, 3.0))
LINE_GOOD_SCHOOLS = ChartSpec(
    "line", title="Teacher training places", x_values=YEARS_10, direct_labels=True,
    series=_walk(33, 2, 10, 40.0, 2.0), series_names=("Primary", "Secondary"), value_label="Places")
TABLE_SCHOOLS = ChartSpec(
    "not_chart", variant="table", title="Resource packs issued",
    categories=("Tide pools", "Plankton", "Dune life", "Weather"), series_names=("2020", "2021", "2022"),
    series=((140, 165, 190), (80, 95, 120), (60, 72, 70), (44, 51, 63)), size_in=(5.0, 2.5), tick_pt=8.0)

# --- Finance -----------------------------------------------------------------------------
STACK_6 = ChartSpec(
    "bar", variant="stacked", title="Expenditure by cost line", categories=_years(2018, 2023), natural_order=True,
    series=((3.1, 3.2, 3.4, 3.5, 3.7, 3.8), (1.2, 1.1, 1.4, 1.3, 1.5, 1.6), (0.9, 1.0, 1.0, 1.2, 1.1, 1.3),
            (0.7, 0.7, 0.8, 0.8, 0.9, 0.9), (0.4, 0.5, 0.5, 0.6, 0.6, 0.7), (0.3, 0.3, 0.4, 0.4, 0.4, 0.5)),
    series_names=("Staff", "Vessels", "Laboratory", "Estates", "IT", "Outreach"), value_label="Spend (m)",
    size_in=(6.0, 3.0), notes=("stacked bars with 6 segments",))
AREA_INCOME = ChartSpec(
    "area", variant="stacked", title="Income by source", x_values=YEARS_10, direct_labels=True,
    series=_walk(41, 3, 10, 2.0, 0.1), series_names=("Grants", "Contracts", "Donations"), value_label="Income (m)",
    notes=("stacked area, labelled directly",))
BAR_3D = ChartSpec(
    "bar", title="Capital investment", categories=_years(2019, 2023), natural_order=True, three_d=True,
    series=((1.4, 2.1, 0.9, 1.7, 2.4),), value_label="Investment (m)", notes=("3D-looking bars",))
TABLE_BUDGET = ChartSpec(
    "not_chart", variant="table", title="Budget by cost line (m)", categories=("Staff", "Vessels", "Laboratory",
                                                                         "Estates"),
    series_names=("2021", "2022", "2023"), series=((3.4, 3.5, 3.7), (1.4, 1.3, 1.5), (1.0, 1.2, 1.1),
                                                  (0.8, 0.8, 0.9)), size_in=(5.0, 2.5), tick_pt=8.0)
DONUT_SIMILAR = ChartSpec(
    "pie", variant="donut", title="Spend by department", series=((22, 21, 20, 19, 18),), size_in=(5.0, 3.5),
    categories=("Hydrology", "Fisheries", "Outreach", "Geology", "Central"), notes=("slices of nearly equal share",))
BAR_GOOD = ChartSpec(
    "bar", title="Budget by department", series=((3.4, 2.9, 1.6, 1.1, 0.8),), value_label="Budget (m)",
    categories=("Hydrology", "Fisheries", "Outreach", "Geology", "Finance"))
HIST_TRUNCATED = ChartSpec(
    "histogram", title="Invoice values", n_points=2000, seed=42, axis_min=40, x_label="Value (thousands)",
    value_label="Invoices", notes=("count axis starts at 40",))
STACK_3_FINANCE = ChartSpec(
    "bar", variant="stacked", title="Grant income by funder type", categories=_years(2019, 2023), natural_order=True,
    series=((1.2, 1.4, 1.3, 1.6, 1.8), (0.6, 0.5, 0.7, 0.8, 0.8), (0.2, 0.3, 0.3, 0.3, 0.4)),
    series_names=("Public", "Charitable", "Industry"), value_label="Income (m)", size_in=(5.5, 3.0))

# --- Coastal Geology and Directorate -------------------------------------------------------
MAP_RAINBOW = ChartSpec(
    "map", title="Mean grain size by survey district", series=((0.21, 0.35, 0.18, 0.44, 0.29, 0.52, 0.26, 0.39,
                                                                 0.31, 0.47, 0.23),),
    colormap="jet", value_label="Grain size (mm)", seed=51, size_in=(5.0, 3.5), notes=("rainbow colormap",))
HARBOUR_TEXTURE = ChartSpec("not_chart", variant="texture", seed=52, size_in=(5.0, 3.0),
                            notes=("photo-like texture",))
SCATTER_CLIPPED = ChartSpec(
    "scatter", title="Cliff retreat against wave energy", n_points=200, seed=53, clip_points=True,
    x_label="Wave energy (kJ/m)", value_label="Retreat (cm/yr)", notes=("axis limits cut through the points",))
SCATTER_RAINBOW = ChartSpec(
    "scatter", variant="colour", title="Core sites coloured by depth", n_points=250, seed=54, colormap="rainbow",
    x_label="Easting (km)", value_label="Northing (km)", notes=("rainbow colormap",))
BAR_OUTPUTS = ChartSpec(
    "bar", variant="horizontal", title="Reviewed outputs by department", series=((41, 33, 20, 12, 7),),
    categories=("Hydrology", "Fisheries", "Geology", "Outreach", "Finance"), value_label="Outputs")
PIE_GOOD_ALPHA = ChartSpec(
    "pie", title="Staff by contract type", series=((55, 30, 15),), categories=("Permanent", "Fixed term", "Visiting"),
    size_in=(4.0, 3.0), transparent=True)
MAP_STAFF = ChartSpec(
    "map", title="Field staff days by district", series=((40, 22, 31, 55, 18, 27, 36),), colormap="cividis",
    value_label="Days", seed=55, size_in=(5.0, 3.5))
LINE_GOOD_DIRECTOR = ChartSpec(
    "line", title="Staff numbers", x_values=YEARS_10, direct_labels=True, series=_walk(56, 2, 10, 60.0, 2.0),
    series_names=("Research", "Support"), value_label="FTE")
AREA_OVERLAP = ChartSpec(
    "area", title="Seabird counts at two colonies", x_values=YEARS_10, direct_labels=True,
    series=_walk(57, 2, 10, 300.0, 8.0), series_names=("Gannet Rock", "Puffin Stack"), value_label="Pairs")


def _p(spec: ChartSpec, caption: str = "", source: str = "vector", **kw) -> Placement:
    return Placement(spec, source=source, caption=caption, **kw)


def _raster(spec: ChartSpec, caption: str, dpi: int, fmt: str = "png", **kw) -> Placement:
    return Placement(spec, source="raster", caption=caption, dpi=dpi, fmt=fmt, **kw)


def sample_plans() -> list[DocumentPlan]:
    """The twelve reports of the sample corpus."""
    return [
        DocumentPlan(
            "hydrology-annual-report-2021.pdf", "Hydrology", 2021, "Hydrology annual report 2021",
            "Dr Tamsin Orrell", (
                ("h", "1. Summary"),
                "River flows in the eight monitored catchments rose for the third year running. The Larrow "
                "recorded its highest mean discharge since the network was extended in 2014.",
                _p(LINE_8_SERIES, "Mean annual discharge in the eight monitored catchments, 2014-2023."),
                ("h", "2. Estuary temperature"),
                "Station Q6 again ran warmest in late summer; the winter minimum at Q1 was 0.4 °C above the "
                "ten-year mean.",
                _p(HEATMAP_JET, "Monthly mean water temperature at the eight estuary stations."),
                ("h", "3. Groundwater and abstraction"),
                "Recharge was highest in the northern districts. Public supply remains the largest use of "
                "abstracted water, followed by agriculture.",
                _raster(MAP_RECHARGE, "Groundwater recharge by district, 2021 hydrological year.", 300, scale=1.25),
                _raster(AREA_ABSTRACTION, "Licensed abstraction by use.", 150),
                "Data: Quillmere gauge network, quality-controlled release 2022-02.",
            )),
        DocumentPlan(
            "hydrology-tide-gauges-2022.pdf", "Hydrology", 2022, "Tide gauge network review 2022",
            "Idris Haverleigh", (
                ("h", "Purpose"),
                "This review summarises the record of the Venning and Saltcombe gauges and recommends a "
                "regular survey interval for the spring tide range.",
                _p(LINE_UNEVEN, "Mean sea level at the Venning gauge."),
                "Surveys of the spring tide range were made in irregular years, depending on vessel time.",
                _raster(LINE_GAPS, "Spring tide range from the irregular surveys.", 100),
                ("h", "Rainfall"),
                "Rainfall at the three coastal gauges tracks the regional pattern closely.",
                _p(LINE_GOOD, "Annual rainfall at the three coastal gauges."),
                _raster(HEATMAP_GOOD, "", 150),
                "Dissolved oxygen fell below 6 mg/l at two stations in August only.",
                ("h", "Record quality"),
                "Longer records have fewer missing days; the large upland catchments are the exception.",
                _raster(SCATTER_BUBBLE, "Record length against missing days for each gauge.", 150, fmt="jpeg"),
            )),
        DocumentPlan(
            "fisheries-landings-2021.pdf", "Fisheries", 2021, "Landings and fleet report 2021", "Dr Baptiste Kellaway", (
                ("h", "Landings"),
                "Total landings reached 57 thousand tonnes, the highest in the series. Herring and mackerel "
                "together made up half of all landings by weight.",
                _p(BAR_TRUNCATED, "Total landings into Quillmere harbours, 2016-2023."),
                _p(PIE_8_UNSORTED, "Share of landings by species."),
                ("h", "Fleet"),
                "Port Venning remains the largest registered harbour; Cray Haven lost four vessels.",
                _raster(BAR_HARBOURS, "Vessels registered by harbour.", 300),
                _raster(PIE_3D, "Catch by gear type.", 100, fmt="jpeg"),
            )),
        DocumentPlan(
            "fisheries-stock-assessment-2022.pdf", "Fisheries", 2022, "Stock assessment 2022", "Neha Brindlecombe", (
                ("h", "Sprat"),
                "Five thousand sprat were measured at sea. The length-mass relation is unchanged from 2020.",
                _p(SCATTER_DENSE, "Length and mass of sprat sampled at sea."),
                _raster(SCATTER_GOOD, "", 300),
                "Larval density increases with water temperature up to about 16 °C.",
                ("h", "Shellfish and herring"),
                "Cockle density differs sharply between beds; Blackwater stays the most productive.",
                _p(BOX_UNSORTED, "Cockle density on the five surveyed beds."),
                _raster(BOX_AGES, "Herring length by age class.", 72),
                _p(HIST_GOOD, "Duration of survey hauls."),
            )),
        DocumentPlan(
            "outreach-visitors-2021.pdf", "Outreach", 2021, "Visitor programme 2021", "Lowenna Pennart", (
                ("h", "Events"),
                "Rockpool rambles drew the largest audiences; evening seminars were moved online in spring.",
                _raster(BAR_ROTATED, "Attendance by event type.", 100),
                _p(DONUT_ORIGIN, "Visitors by origin."),
                ("h", "Beach cleans"),
                "Volunteers collected 125 bags of litter across five habitats.",
                _p(LINE_ON_CATEGORIES, "Bags of litter collected per habitat."),
                "Every sample volunteers collect follows the same chain of custody.",
                _p(FLOW_SAMPLES, ""),
            )),
        DocumentPlan(
            "outreach-survey-2023.pdf", "Outreach", 2023, "Audience survey 2023", "Caspar Mossop", (
                ("h", "Reach"),
                "Word of mouth remains the main way new visitors hear of the Institute.",
                _p(PIE_TOTAL_WRONG, "How survey respondents first heard of the Institute."),
                _raster(BAR_RED_GREEN, "Members and volunteers, 2019-2023.", 150, fmt="jpeg"),
                ("h", "Channels"),
                "Email has overtaken post as the main newsletter channel.",
                _p(BAR_LIGHT_TEXT, "Newsletter subscribers by channel."),
                _raster(LINE_TINY_TICKS, "Visits to the Institute website.", 300),
            )),
        DocumentPlan(
            "finance-budget-2022.pdf", "Finance", 2022, "Budget statement 2022", "Yelena Quenby", (
                ("h", "Expenditure"),
                "Staff costs account for just under half of expenditure. Vessel costs rose with fuel prices.",
                _p(STACK_6, "Expenditure by cost line, 2018-2023."),
                _p(AREA_INCOME, "Income by source."),
                ("h", "Capital"),
                "Capital investment peaked with the new laboratory wing.",
                _p(BAR_3D, ""),
                _raster(TABLE_BUDGET, "Budget by cost line, in millions.", 150),
            )),
        DocumentPlan(
            "finance-accounts-2023.pdf", "Finance", 2023, "Annual accounts 2023", "Rufus Wickenden", (
                ("h", "Spending"),
                "Departmental spend was spread almost evenly this year.",
                _raster(DONUT_SIMILAR, "Spend by department.", 150),
                _p(BAR_GOOD, "Budget by department."),
                ("h", "Invoices and grants"),
                "Most invoices fall between five and fifteen thousand.",
                _raster(HIST_TRUNCATED, "Distribution of invoice values.", 100, fmt="jpeg"),
                _raster(STACK_3_FINANCE, "Grant income by funder type.", 150, tiles=2),
            )),
        DocumentPlan(
            "geology-sediment-survey-2022.pdf", "Coastal Geology", 2022, "Sediment survey 2022", "Osric Talbanne", (
                ("h", "Grain size"),
                "Coarser sediment dominates the exposed western districts.",
                _p(MAP_RAINBOW, "Mean grain size by survey district."),
                _raster(HARBOUR_TEXTURE, "", 150, fmt="jpeg"),
                "The survey vessel at the Port Venning mooring before the autumn campaign.",
                ("h", "Cliffs and cores"),
                "Retreat rates rise with wave energy, with wide scatter at the exposed headlands.",
                _p(SCATTER_CLIPPED, "Cliff retreat against incident wave energy."),
                _p(SCATTER_RAINBOW, "Sediment core sites coloured by core depth."),
            )),
        DocumentPlan(
            "director-review-2023.pdf", "Directorate", 2023, "Director's review 2023", "Prof. Maren Stroud-Avery", (
                ("h", "The year in numbers"),
                "Hydrology and Fisheries produced most of the reviewed outputs this year.",
                _p(BAR_OUTPUTS, "Reviewed outputs by department."),
                _raster(PIE_GOOD_ALPHA, "Staff by contract type.", 150, fmt="png-alpha"),
                ("h", "Field work"),
                "Field staff spent most days in the northern districts.",
                _p(MAP_STAFF, "Field staff days by district."),
                _raster(LINE_GOOD_DIRECTOR, "Staff numbers, full-time equivalent.", 150, fmt="jpeg", scale=1.2),
            )),
        DocumentPlan(
            "fisheries-bycatch-2023.pdf", "Fisheries", 2023, "Bycatch monitoring 2023", "Neha Brindlecombe", (
                ("h", "Bycatch"),
                "Longline bycatch rates are higher at every depth band.",
                _raster(SCATTER_RED_GREEN, "Bycatch rate against depth by gear.", 100),
                _p(AREA_OVERLAP, ""),
                "Both seabird colonies grew slowly over the decade.",
                ("h", "Condition and discards"),
                "Plaice condition improves through the survey year, as in previous years.",
                _raster(BOX_SEASONS_ROTATED, "Plaice condition index by survey.", 150),
                _raster(BAR_UNSORTED, "Discards by species.", 72),
            )),
        DocumentPlan(
            "outreach-schools-2022.pdf", "Outreach", 2022, "Schools programme 2022", "Lowenna Pennart", (
                ("h", "Pupils"),
                "School visits recovered to their 2019 level, led by junior classes.",
                _raster(AREA_SCHOOLS, "School visits by key stage.", 150),
                _p(STACK_3_SCHOOLS, "Workshops delivered by format."),
                ("h", "Teachers"),
                "Teacher training places grew in both phases.",
                _p(LINE_GOOD_SCHOOLS, ""),
                _p(TABLE_SCHOOLS, "Resource packs issued to schools."),
            )),
    ]


def sample_images() -> list[ImagePlan]:
    """Loose figure files sent alongside the reports."""
    return [
        ImagePlan("figures/salinity-heatmap.png", "Hydrology", 2022, ChartSpec(
            "heatmap", title="Salinity by month and station", categories=MONTHS, series_names=STATIONS,
            colormap="cividis", value_label="PSU", seed=61, size_in=(5.0, 3.5)), "png", 100),
        ImagePlan("figures/visitor-numbers.jpg", "Outreach", 2023, ChartSpec(
            "bar", title="Visitors by year", categories=_years(2020, 2023), natural_order=True,
            series=((3100, 5200, 4600, 4900),), value_label="Visitors"), "jpeg", 100),
        ImagePlan("figures/harbour-photo.jpg", "Outreach", 2021,
                  ChartSpec("not_chart", variant="texture", seed=63, size_in=(4.0, 3.0)), "jpeg", 100),
        ImagePlan("figures/catch-share-pie.png", "Fisheries", 2023, ChartSpec(
            "pie", title="Catch share by harbour", series=((28, 22, 18, 14, 10, 6, 2),), size_in=(5.0, 3.5),
            categories=("Port Venning", "Saltcombe", "Merrow", "Eddisham", "Tollard", "Cray Haven", "Other")),
                  "png", 100),
    ]


def person(rng: np.random.Generator) -> str:
    return f"{_FIRST[int(rng.integers(len(_FIRST)))]} {_LAST[int(rng.integers(len(_LAST)))]}"


_SENTENCES = (
    "Measurements follow the Institute's field protocol, revised in {year}.",
    "The {site} series was checked against duplicate samples and {n} outliers were removed.",
    "Results are provisional until the annual quality review in {month}.",
    "Compared with the previous period the change is {n} per cent, within the expected range.",
    "Field teams completed {n} visits to {site} despite two weeks of storm closures.",
    "Funding for the {site} work continues until {year}.",
)
_SITES = ("Port Venning", "Saltcombe", "Merrow Quay", "Eddisham", "Tollard Bay", "Cray Haven", "Wrenfold")


def filler_paragraph(rng: np.random.Generator) -> str:
    picks = rng.choice(len(_SENTENCES), size=3, replace=False)
    return " ".join(_SENTENCES[int(i)].format(
        year=int(rng.integers(2019, 2026)), site=_SITES[int(rng.integers(len(_SITES)))],
        n=int(rng.integers(2, 60)), month=MONTHS[int(rng.integers(12))]) for i in picks)


def generic_caption(spec: ChartSpec) -> str:
    return spec.title + "." if spec.title else "Survey photograph."
