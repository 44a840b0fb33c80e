"""Values a user could type or paste into a numeric field that have crashed or fooled parsers:
IEEE 754 overflow and underflow (``1e400``, subnormal ``1e-320``; from memory), NaN and
infinities, absurd levels, a decimal comma that is ambiguous (``1,234``) or not (``-7,5``),
400 digits, and Rich markup. Shared by the workspace test (tests/functional/test_hostile_fields.py)
and the unit test of the same values through the workspaces' own parsers
(tests/unit/test_hostile_field_values.py)."""

HOSTILE = [
    "nan",
    "-inf",
    "1e400",
    "1e308 dBm",
    "-1e308 dB",
    "1e-320 nm",
    "1e-320 pW",
    "-4000 dBm",
    "1e-300 pW",
    "-7,5",
    "1,234",
    "5 MW",
    "0 mW",
    "9" * 400,
    "[bold]x[/",
]
