"""Themes of our own: the high-contrast one is for reading a screen in direct sunlight."""

from __future__ import annotations

from typing import Any

from rich.terminal_theme import TerminalTheme
from textual.app import App
from textual.theme import Theme

HIGH_CONTRAST = "fieldkit-sunlight"

SUNLIGHT = Theme(
    name=HIGH_CONTRAST,
    primary="#000000",
    secondary="#000000",
    accent="#0000B0",
    warning="#7A4A00",
    error="#B00000",
    success="#006400",
    foreground="#000000",
    background="#FFFFFF",
    # Buttons, inputs and lists sit on a light grey block (16:1 for black text), so a
    # compact button still looks pressable on the white background.
    surface="#E4E4E4",
    panel="#E8E8E8",
    dark=False,
    luminosity_spread=0.05,
    text_alpha=1.0,
    variables={
        "input-selection-background": "#0000B0 40%",
        "footer-key-foreground": "#FFFFFF",
        "footer-key-background": "#000000",
        "footer-description-foreground": "#000000",
        "footer-background": "#FFFFFF",
        "border": "#000000",
        "border-blurred": "#555555",
        # Labels and hints stay readable in sunlight: "auto" keeps them contrasting with
        # whatever is behind them (black on white, white on the black current tab); at 80 %
        # and 65 % they are #333333 and #595959 on white, 12.6:1 and 7.0:1 (WCAG 2.1 contrast
        # formula), where the defaults (60 %, 38 %) are 5.7:1 and 2.6:1. Placeholders stay
        # lighter than typed text so a hint is not mistaken for a value.
        "text-muted": "auto 80%",
        "text-disabled": "auto 65%",
    },
)


#: How plain colour names in the jobs and end-of-day text ("red" for a failure, "yellow" for
#: an open job or a result in doubt, "green" for a pass) show on a light background. The stock
#: light mapping's yellow (203, 144, 0) is 2.6:1 on white and its green 4.2:1; these are all
#: at least 7:1 (WCAG 2.1 contrast formula), and red stays apart from amber.
SUNLIGHT_ANSI = TerminalTheme(
    (255, 255, 255),
    (0, 0, 0),
    [
        (0, 0, 0),  # black
        (176, 0, 0),  # red: failures, the theme's error colour
        (0, 100, 0),  # green: passes
        (122, 74, 0),  # yellow: open, in doubt, cautions (dark amber, the warning colour)
        (0, 0, 176),  # blue
        (106, 27, 122),  # magenta
        (0, 90, 102),  # cyan
        (77, 77, 77),  # white: a grey that still reads on white
    ],
    [
        (77, 77, 77),
        (139, 0, 0),
        (0, 80, 0),
        (107, 64, 0),
        (0, 0, 139),
        (90, 19, 112),
        (0, 79, 90),
        (51, 51, 51),
    ],
)


def register_themes(app: App[Any]) -> None:
    app.register_theme(SUNLIGHT)
    # Used whenever a light theme is on; the default dark theme keeps its own mapping.
    app.ansi_theme_light = SUNLIGHT_ANSI
