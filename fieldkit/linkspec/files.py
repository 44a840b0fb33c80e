"""Reading a link description file (TOML or JSON) into the plain dict that
:func:`fieldkit.linkspec.resolve` takes."""

from __future__ import annotations

import json
import tomllib
from pathlib import Path
from typing import Any

from fieldkit.calc.units import InputError
from fieldkit.fsutil import MIB, read_regular


def load_spec_file(path: Path) -> dict[str, Any]:
    """The link description in a TOML or JSON file (by suffix; other names try both).

    Raises
    ------
    InputError
        For a missing, unreadable or malformed file.
    """
    path = Path(path)
    try:
        # a regular file only, at most 1 MiB: /dev/zero or a FIFO is refused, never read
        text = read_regular(path, MIB).decode("utf-8-sig")  # an editor's BOM is fine
    except FileNotFoundError:
        raise InputError(f"link file {path}: not found") from None
    except OSError as exc:
        raise InputError(f"link file {path}: cannot be read ({exc.strerror or exc})") from None
    except UnicodeDecodeError as exc:
        raise InputError(f"link file {path}: cannot be read ({exc})") from None
    suffix = path.suffix.lower()
    data: Any
    if suffix == ".json" or (suffix != ".toml" and text.lstrip().startswith("{")):
        try:
            data = json.loads(text, parse_constant=_refuse_constant)
        except ValueError as exc:
            raise InputError(f"link file {path}: not valid JSON ({exc})") from None
        except RecursionError:
            raise InputError(f"link file {path}: not valid JSON (nested too deeply)") from None
    else:
        try:
            data = tomllib.loads(text)
        except tomllib.TOMLDecodeError as exc:
            raise InputError(f"link file {path}: not valid TOML ({exc})") from None
        except RecursionError:
            raise InputError(f"link file {path}: not valid TOML (nested too deeply)") from None
    if not isinstance(data, dict):
        raise InputError(f"link file {path}: must hold one table (object) describing the link")
    return data


def _refuse_constant(name: str) -> Any:
    raise ValueError(f"{name} is not a number")
