"""No company names in the code, tests, docs or presets (project rule: trade words only).

The list holds names of standards bodies' commercial owners that crept in before (the OTDR
record's standard was cited with its publisher's name); extend it when another one is found.
"""

from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
WHERE = ["fieldkit", "tests", "presets", "README.md", "DEVELOPERS.md"]
# Spelled in pieces so this file does not name them itself.
NAMES = ["Tel" + "cordia", "Bell" + "core"]


def _files():
    for part in WHERE:
        path = ROOT / part
        if path.is_file():
            yield path
        elif path.is_dir():
            for item in path.rglob("*"):
                if item.is_file() and item.suffix in {
                    ".py",
                    ".md",
                    ".toml",
                    ".json",
                    ".txt",
                    ".tcss",
                }:
                    yield item


def test_no_company_names_anywhere() -> None:
    hits = []
    for path in _files():
        text = path.read_text(encoding="utf-8", errors="replace").lower()
        for name in NAMES:
            if name.lower() in text:
                hits.append(f"{path.relative_to(ROOT)}: {name}")
    assert not hits, hits
