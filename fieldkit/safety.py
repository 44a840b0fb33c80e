"""Safety cautions shown by the help screen, the fault workspace, the CLI and the reports.

One wording, kept here, so every place says the same thing.
"""

INVISIBLE_LIGHT = (
    "Light in fibre at 850, 1300, 1310, 1490 and 1550 nm is invisible and can damage the eye. "
    "Never look into a fibre end, a connector or an adapter, with or without a magnifier or "
    "microscope; check for light with a power meter, and cap connectors you are not using."
)
# Short forms: each a whole sentence (the full caution, with DEFER, a key or a click away and in
# Help). SHORT fits one line of a phone terminal (42 columns) after "⚠ "; NARROW fits one line
# with "… more" after it at 42 columns (tests/unit/test_safety_short.py checks both).
INVISIBLE_LIGHT_SHORT = "Invisible light: never look into fibres."
INVISIBLE_LIGHT_NARROW = "Never look into a fibre end."
# The line of a printed test report (whole, no "more" to follow).
INVISIBLE_LIGHT_REPORT = (
    "Invisible light: never look into a fibre or connector; check for light with a power meter."
)
FAULT_LOCATOR = (
    "A visual fault locator is a visible red laser, usually Class 2 or 3R (IEC 60825-1): do not "
    "look into its output or a lit fibre end, and do not point it at people."
)
GLASS_SHARDS = (
    "Fibre offcuts are glass shards that pierce skin and are hard to find: wear safety glasses, "
    "put offcuts in a marked shard container, never on the floor or the work surface, and do "
    "not eat or drink at the splice bench."
)
SPLICER_HEAT = (
    "The fusion splicer's electrodes carry a high-voltage arc and the heat-shrink oven runs hot: "
    "keep fingers out of both while they work and let a sleeve cool before handling it."
)
# Before splicing: the fibre may be lit from the far end, or a locator may be on it.
NEVER_LOOK = (
    "Never look into a fibre end or a visual fault locator's output: the far end may be lit "
    "with invisible light."
)
DIGGING = (
    "Before digging: have buried services located and marked, as local rules require. Before "
    "anyone digs or opens a closure at a located fault, confirm the position with a second "
    "measurement or from the other end, and keep to the site's permit and traffic rules."
)
# The same caution in one line of the fault workspace where rows are scarce (the full one a key
# or a click away, and on hover); the narrow one fits a phone terminal (42 columns).
DIGGING_SHORT = "Before digging: have buried services located and marked."
DIGGING_NARROW = "Have services marked, then dig."
# The visual fault locator caution in one line (the full one, FAULT_LOCATOR, on hover and a key
# or a click away); the narrow one fits the fault workspace's column at 80 columns and a phone.
FAULT_LOCATOR_SHORT = "Red locator laser: never look into it or a lit fibre end."
FAULT_LOCATOR_NARROW = "Never look into the locator."
OTDR_LIVE_FIBRE = (
    "An OTDR sends strong invisible pulses: never look into its port or a fibre end under test. "
    "A pulse into a live fibre can damage the receiver at the far end: disconnect the equipment "
    "first, or on an in-service PON test only through a filtered port at an out-of-band "
    "wavelength, and follow the operator's procedures."
)
# Two lines of an 80-column screen, and one line of a phone terminal.
OTDR_LIVE_FIBRE_MEDIUM = (  # two lines at 80 columns
    "Invisible OTDR pulses: never look into the port or a fibre end. Live fibre: disconnect "
    "first or use a filtered PON port (pulses can damage its receiver)."
)
# Two lines of a phone terminal (42 columns): a whole sentence.
OTDR_LIVE_FIBRE_SHORT = (
    "Invisible pulses: never look into a port or fibre end; disconnect live fibre first."
)
DEFER = (
    "fieldkit gives estimates to plan and check work; it does not replace local codes, site "
    "rules, the operator's procedures or licensed practice, which always take precedence."
)

ALL = (INVISIBLE_LIGHT, FAULT_LOCATOR, OTDR_LIVE_FIBRE, GLASS_SHARDS, SPLICER_HEAT, DIGGING, DEFER)

#: The cautions of the splice log (workspace and report), in order.
SPLICING = (GLASS_SHARDS, SPLICER_HEAT, NEVER_LOOK, FAULT_LOCATOR)
# The same cautions in one line of the splice workspace (the full ones on hover and in Help).
SPLICING_SHORT = "Wear glasses, bin shards, mind the hot arc and oven, never look into a fibre."
