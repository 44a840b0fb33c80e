"""Hostile and odd input on every command: exit 2 (or 0 where the input is fine), one line on
stderr naming the problem, never a traceback, never a partial write.

Each case runs the CLI as a user runs it (in-process: cli_runner.py). The data and config
folders come from the autouse fixture in tests/conftest.py, so nothing touches a real folder.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
from collections.abc import Iterator
from pathlib import Path

import cli_runner
import pytest


def run(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess[str]:
    return cli_runner.run(*args, cwd=cwd)


def assert_refused(result: subprocess.CompletedProcess[str], *words: str) -> None:
    """Exit 2, no traceback, one line on stderr that holds every word in ``words``."""
    assert "Traceback" not in result.stderr, result.stderr
    assert result.returncode == 2, (result.returncode, result.stdout, result.stderr)
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1, result.stderr
    for word in words:
        assert word.lower() in lines[0].lower(), lines[0]


# -- typed values: levels, losses, lengths --------------------------------------------------


@pytest.mark.parametrize(
    ("args", "words"),
    [
        (("convert", ""), ("empty",)),
        (("convert", "NaN dBm"), ("NaN",)),
        (("convert", "-inf dBm"), ("infinity",)),
        (("convert", "1e400 dBm"), ("too large",)),
        # 10^(1e308/10) mW does not fit in a float (the largest is about 1.8e308)
        (("convert", "1e308 dBm", "--to", "mW"), ("too large",)),
        (("convert", "4000 dBm", "--to", "mW"), ("too large",)),
        (("convert", "-1e308 dB", "--to", "%"), ("too large",)),
        (("convert", "1,234 dBm"), ("ambiguous",)),
        (("convert", "1.2,3 dBm"), ("separators",)),
        (("convert", "5 MW"), ("mega",)),
        (("convert", "5 km", "--to", "dBm"), ("length",)),
        (("convert", "0 mW"), ("logarithm",)),
        (("convert", "0.35 dB/dB"), ("length",)),
        (("levels", "1e308", "1e308"), ("too large",)),
        (("levels", "5 dBm", "--gain", "1e308"), ("too large",)),
        (("levels", "5 dBm", "--loss", "3 km"), ("length",)),
        (("budget", "--fibre-type", "OS2", "--length", "-5km"), ("negative",)),
        (("budget", "--fibre-type", "OS2", "--length", "5 dBm"), ("power",)),
        (("budget", "--fibre-type", "NOPE", "--length", "5km"), ("NOPE",)),
        (("budget", "--fibre-type", "../../etc/passwd", "--length", "5km"), ("unknown fibre",)),
        (("budget", "--fibre-type", "OS2", "--length", "5km", "--connectors", "2.5"), ("whole",)),
        (("budget", "--fibre-type", "OS2", "--length", "5km", "--splitter", "1x0"), ("outputs",)),
        (("budget", "--fibre-type", "OS2", "--length", "5km", "--wavelength", "1311"), ("1311",)),
        (("budget", "--attenuation", "0.35", "--length", "5km"), ("length unit",)),
        (("loss", "--reference", "-7", "--reading", "0 mW"), ("logarithm",)),
        (("loss", "--reference", "-7", "--reading", "-9", "--method", "bogus"), ("method",)),
        (("reference", "--level", "5 km", "--wavelength", "1310"), ("length",)),
        (("locate", "--distance", "5 dBm", "--ior", "1.468"), ("power",)),
        (("locate", "--distance", "1km", "--ior", "0.5"), ("below 1",)),
        (("locate", "--distance", "1km", "--ior", "1,468"), ("ambiguous",)),
        # the error terms are squared: 1e308 m used to overflow instead of being refused
        (
            ("locate", "--distance", "1km", "--ior", "1.468", "--sample-spacing", "1e308"),
            ("sample spacing",),
        ),
        (("locate", "--distance", "1km", "--ior", "1.468", "--offset", "1e300 km"), ("offset",)),
        (("locate", "--distance", "1e30 km", "--ior", "1.468"), ("longer",)),
        (("locate", "--time", "1e308 s", "--ior", "1.468", "--json"), ("round-trip",)),
        (("jobs", "list", "--date", "2026-02-30"), ("date",)),
        (("jobs", "list", "--date", ""), ("not a date",)),
        (("presets", ""), ("unknown preset kind",)),
        (("presets", "--check", ""), ("--check", "empty")),
        (("presets", "--check", "/"), ("is a folder",)),
        # the message used to print all 309 digits of 1e308
        (("convert", "1e308 nm", "--grid"), ("1.00000e+308 nm", "neither")),
        (("convert", "0 nm", "--to", "THz"), ("positive",)),
        # 1e-320 is a subnormal float (below about 2.2e-308, IEEE 754): refused as typed
        (("convert", "1e-320 nm", "--grid"), ("too close to zero",)),
        (("convert", "1e-320 nm", "--to", "THz"), ("too close to zero",)),
        # underflow: 10^(-4000/10) mW = 1e-400 mW is below the smallest float
        (("convert", "-4000 dBm"), ("quantity", "below any measurable level")),
        (("convert", "-4000 dBm", "--to", "mW"), ("below any measurable level",)),
        (("convert", "1e-320 pW"), ("quantity", "too close to zero")),
        (("convert", "1e-300 pW", "--to", "dBm"), ("below any measurable level",)),
        (("convert", "4000 dB", "--to", "%"), ("less power",)),
        (("loss", "--reference", "1e-320 pW", "--reading", "-9"), ("reference", "too close")),
        (("loss", "--reference", "1e-300 pW", "--reading", "-9"), ("reference", "below any")),
        (("reference", "--level", "1e-320 pW", "--wavelength", "1310"), ("level", "too close")),
        (("levels", "1e-320 pW", "--loss", "3"), ("level 1", "too close")),
        (("levels", "-4000 dBm", "--loss", "3"), ("below any",)),
        (
            (
                "budget",
                "--fibre-type",
                "OS2",
                "--length",
                "1km",
                "--tx-min",
                "1e-300 pW",
                "--tx-max",
                "0",
                "--rx-sensitivity",
                "-20",
                "--rx-overload",
                "0",
            ),
            ("below any",),
        ),
        # a landmark at 1e-200 m on the trace made the route ratio overflow when squared
        (
            ("locate", "--distance", "200 m", "--ior", "1.4682", "--landmark", "A:1e-200 m:0.5 m"),
            ("landmarks",),
        ),
        (("convert", "1e308 THz", "--to", "nm"), ("out of range",)),
        # an empty option (an unset shell variable) used to be dropped: all units, no check
        (("convert", "5 dBm", "--to", ""), ("no unit",)),
        (
            ("budget", "--fibre-type", "OS2", "--length", "1km", "--application", ""),
            ("--application", "empty"),
        ),
        (
            ("budget", "--fibre-type", "OS2", "--length", "1km", "--transceiver", " "),
            ("--transceiver", "empty"),
        ),
    ],
)
def test_bad_values_are_refused_in_one_line(args: tuple[str, ...], words: tuple[str, ...]) -> None:
    assert_refused(run(*args), *words)


@pytest.mark.parametrize(
    ("args", "expect"),
    [
        # A value that starts with '-' is a value, not an option: argparse alone takes only
        # -5 and -5.5 for negative numbers, so these used to fail with "expected one argument".
        # -7,5 and -3,2 are -7.5 and -3.2 dBm: difference -4.3 dB (by hand)
        (("levels", "-7,5", "-3,2", "--json"), {"difference_db": -4.3}),
        # 10^(-0.5) mW = 0.316228 mW (ITU-R V.574 definition of dBm, by hand)
        (("convert", "-5dBm", "--to", "mW", "--json"), {"value": 0.31622777}),
        # -1e3 dBm is -1030 dBW (dBW = dBm − 30, ITU-R V.574)
        (("convert", "-1e3 dBm", "--to", "dBW", "--json"), {"value": -1030.0}),
        # -7.2 − (-9.1) = 1.9 dB
        (
            ("loss", "--reference", "-7,2dBm", "--reading", "-9.1dBm", "--limit", "3", "--json"),
            {"loss_db": 1.9},
        ),
        # Unicode minus (U+2212) as a technician's keyboard may type it
        (("convert", "\u22127.5 dBm", "--to", "dBm", "--json"), {"value": -7.5}),
    ],
)
def test_values_starting_with_a_minus_are_values(
    args: tuple[str, ...], expect: dict[str, float]
) -> None:
    result = run(*args)
    assert result.returncode == 0, result.stderr
    data = json.loads(result.stdout)
    for key, value in expect.items():
        assert data[key] == pytest.approx(value, abs=1e-6)


def test_a_negative_length_typed_without_a_space_is_refused_as_negative() -> None:
    assert_refused(run("budget", "--fibre-type", "OS2", "--length", "-5km"), "negative")


# -- link description files for `fieldkit budget FILE` ---------------------------------------

_GOOD_SEGMENT = '[[segments]]\nfibre = "OS2"\nlength = "5 km"\n'


@pytest.mark.parametrize(
    ("name", "content", "words"),
    [
        ("deep.json", b"[" * 100_000 + b"]" * 100_000, ("nested too deeply",)),
        ("deep.toml", b"x = " + b"[" * 5000 + b"]" * 5000, ("nested too deeply",)),
        ("nonutf8.toml", b"\xff\xfe garbage \x80", ("cannot be read",)),
        ("trunc.json", b'{"segments": [{"fibre": "OS2"', ("not valid JSON",)),
        ("nan.json", b'{"segments": [{"fibre": "OS2", "length": NaN}]}', ("NaN",)),
        ("list.json", b"[1, 2, 3]", ("one table",)),
        ("empty.toml", b"", ("segments",)),
        ("num.json", b'{"segments": [{"fibre": "OS2", "length": 5}]}', ("needs a unit",)),
        ("inf.toml", b'[[segments]]\nfibre = "OS2"\nlength = inf\n', ("finite",)),
        ("nan.toml", b'[[segments]]\nfibre = "OS2"\nlength = nan\n', ("finite",)),
        ("date.toml", b'[[segments]]\nfibre = "OS2"\nlength = 1979-05-27\n', ("not a value",)),
        (
            "big.json",
            b'{"segments": [{"fibre": "OS2", "length": "5 km"}], "connectors": {"count": 1'
            + b"0" * 400
            + b"}}",
            ("401-digit",),
        ),
        (
            "bool.json",
            b'{"segments": [{"fibre": "OS2", "length": "5 km"}], "connectors": {"count": true}}',
            ("not a number",),
        ),
        (
            "extra.json",
            b'{"segments": [{"fibre": "OS2", "length": "5 km"}], "colour": 1}',
            ("colour",),
        ),
        (
            "kind.json",
            b'{"segments": [{"fibre": "OS2", "length": "5 km"}], '
            b'"components": [{"kind": "bogus", "loss": "1 dB"}]}',
            ("bogus",),
        ),
        (
            "mixed.toml",
            (_GOOD_SEGMENT + '[[segments]]\nfibre = "OM4"\nlength = "1 km"\n').encode(),
            ("multimode",),
        ),
    ],
)
def test_broken_link_files_are_refused(
    tmp_path: Path, name: str, content: bytes, words: tuple[str, ...]
) -> None:
    path = tmp_path / name
    path.write_bytes(content)
    assert_refused(run("budget", str(path)), *words)


def test_a_folder_given_as_link_file_is_refused(tmp_path: Path) -> None:
    folder = tmp_path / "link.toml"
    folder.mkdir()
    assert_refused(run("budget", str(folder)), "cannot be read")


@pytest.mark.parametrize("suffix", [".toml", ".json"])
def test_a_link_file_with_a_byte_order_mark_is_read(tmp_path: Path, suffix: str) -> None:
    # Some editors start UTF-8 files with U+FEFF; the file is still UTF-8 text.
    body = (
        _GOOD_SEGMENT if suffix == ".toml" else '{"segments": [{"fibre": "OS2", "length": "5 km"}]}'
    )
    path = tmp_path / f"link{suffix}"
    path.write_bytes(b"\xef\xbb\xbf" + body.encode())
    result = run("budget", str(path), "--json", "--wavelength", "1310")
    assert result.returncode == 0, result.stderr
    data = json.loads(result.stdout)
    # OS2 at 1310 nm: 0.4 dB/km max (presets/fibres.toml, TIA-568.3-D) × 5 km = 2.0 dB, plus
    # 2 mated pairs × 0.75 dB (TIA-568.3-D default grade) = 1.5 dB: 3.5 dB by hand
    assert data["wavelengths"][0]["loss_db"] == pytest.approx(3.5, abs=1e-9)


# -- user preset files -----------------------------------------------------------------------


def test_a_deeply_nested_user_preset_file_is_a_problem_not_a_crash(
    isolated_dirs: dict[str, Path],
) -> None:
    presets = isolated_dirs["config"] / "presets"
    presets.mkdir(parents=True)
    (presets / "deep.toml").write_bytes(b"x = " + b"[" * 5000 + b"]" * 5000)
    (presets / "folder.toml").mkdir()
    (presets / "nonutf8.toml").write_bytes(b"\xff\xfe")
    listing = run("presets", "fibres")
    assert listing.returncode == 0, listing.stderr
    assert "Traceback" not in listing.stderr
    assert "deep.toml: is not valid TOML (nested too deeply)" in listing.stdout
    assert "folder.toml: cannot be read" in listing.stdout
    assert "nonutf8.toml: is not UTF-8 text" in listing.stdout
    # the shipped presets still load and a budget still computes
    result = run("budget", "--fibre-type", "OS2", "--length", "5km", "--json")
    assert result.returncode == 0, result.stderr
    check = run("presets", "--check", str(presets / "deep.toml"))
    assert_refused(check, "1 problem")


def test_a_user_preset_file_with_a_byte_order_mark_loads(tmp_path: Path) -> None:
    path = tmp_path / "mine.toml"
    path.write_bytes(
        b"\xef\xbb\xbf" + b'[[connectors]]\nname = "site grade"\nloss_max_db = 0.5\n'
        b'source = "site specification"\n'
    )
    result = run("presets", "--check", str(path))
    assert result.returncode == 0, result.stdout + result.stderr
    assert "connectors: site grade" in result.stdout


# -- jobs: ids, prefixes, hand-off files, exports --------------------------------------------


def _new_job(name: str) -> str:
    result = run("jobs", "new", name, "--json")
    assert result.returncode == 0, result.stderr
    return str(json.loads(result.stdout)["id"])


@pytest.mark.parametrize("job_id", ["", "../../etc/passwd", "/etc/passwd", "..", "x*", "-x"])
def test_path_tricks_in_job_ids_are_refused(job_id: str) -> None:
    assert_refused(run("jobs", "show", "--", job_id), "not a job id")


def test_a_prefix_of_two_jobs_is_refused_and_names_both(isolated_dirs: dict[str, Path]) -> None:
    from fieldkit.jobs.models import Job
    from fieldkit.jobs.store import JobStore

    # New ids differ in their first 8 digits; files from elsewhere may still share a start.
    store = JobStore(isolated_dirs["data"] / "jobs")
    first, second = "abcdef0100000000001", "abcdef0200000000002"
    for job_id, name in ((first, "one"), (second, "two")):
        store.save(Job(id=job_id, name=name))
    common = os.path.commonprefix([first, second])
    assert common == "abcdef0"
    result = run("jobs", "note", common, "hello")
    assert_refused(result, "matches 2 jobs", first, second)
    # nothing was written: neither job has a note
    for job_id in (first, second):
        shown = json.loads(run("jobs", "show", job_id, "--json").stdout)
        assert shown["job"]["notes"] == []


def test_export_onto_the_jobs_own_file_is_refused(isolated_dirs: dict[str, Path]) -> None:
    job_id = _new_job("keep me")
    job_file = isolated_dirs["data"] / "jobs" / f"{job_id}.json"
    before = job_file.read_bytes()
    assert_refused(
        run("jobs", "export", job_id, "--format", "csv", "-o", str(job_file)),
        "inside the data folder",
    )
    assert job_file.read_bytes() == before
    assert_refused(
        run(
            "jobs", "export", job_id, "--format", "md", "-o", str(job_file.parent / "sub" / "r.md")
        ),
        "inside the data folder",
    )
    assert run("jobs", "show", job_id).returncode == 0


def test_export_elsewhere_still_writes(tmp_path: Path) -> None:
    job_id = _new_job("report")
    target = tmp_path / "out" / "report.csv"
    # A folder that does not exist is refused, not made (a typo must not scatter folders).
    assert_refused(
        run("jobs", "export", job_id, "--format", "csv", "-o", str(target)), "does not exist"
    )
    assert not target.parent.exists()
    target.parent.mkdir()
    result = run("jobs", "export", job_id, "--format", "csv", "-o", str(target))
    assert result.returncode == 0, result.stderr
    assert target.read_text(encoding="utf-8-sig").startswith("job,")


@pytest.mark.parametrize(
    ("content", "words"),
    [
        (b"[" * 100_000 + b"]" * 100_000, ("nested too deeply", "nothing imported")),
        (b"\xff\xfe", ("nothing imported",)),
        (b"", ("not valid JSON",)),
        (b"null", ("neither",)),
    ],
)
def test_broken_handoff_files_import_nothing(
    tmp_path: Path, isolated_dirs: dict[str, Path], content: bytes, words: tuple[str, ...]
) -> None:
    path = tmp_path / "handoff.json"
    path.write_bytes(content)
    assert_refused(run("jobs", "import", str(path)), *words)
    jobs_dir = isolated_dirs["data"] / "jobs"
    assert not list(jobs_dir.glob("*.json")) if jobs_dir.exists() else True


@pytest.mark.parametrize("bad_id", ["../../etc/evil", "/abs", ""])
def test_handoff_with_a_path_trick_id_imports_nothing(
    tmp_path: Path, isolated_dirs: dict[str, Path], bad_id: str
) -> None:
    job_id = _new_job("source")
    jobs_dir = isolated_dirs["data"] / "jobs"
    data = json.loads((jobs_dir / f"{job_id}.json").read_text(encoding="utf-8"))
    data["id"] = bad_id
    path = tmp_path / "evil.json"
    path.write_text(json.dumps(data), encoding="utf-8")
    assert_refused(run("jobs", "import", str(path)), "not a fieldkit job id", "nothing imported")
    assert sorted(p.name for p in jobs_dir.glob("*.json")) == [f"{job_id}.json"]
    assert not (tmp_path / "etc").exists()


def test_a_deeply_nested_job_file_is_quarantined_and_the_rest_list(
    isolated_dirs: dict[str, Path],
) -> None:
    job_id = _new_job("fine")
    jobs_dir = isolated_dirs["data"] / "jobs"
    bad = jobs_dir / ("f" * len(job_id) + ".json")
    bad.write_bytes(b"[" * 100_000 + b"]" * 100_000)
    result = run("jobs", "list", "--rescan")
    assert "Traceback" not in result.stderr, result.stderr
    assert result.returncode == 0, result.stderr
    assert job_id in result.stdout
    assert "nested too deeply" in result.stderr
    assert not bad.exists()
    assert list((jobs_dir / "quarantine").glob(bad.name + ".*"))


@pytest.mark.parametrize(
    "args",
    [
        ("budget", "--fibre-type", "OS2", "--length", "5km", "--job", "1a", "--link", "L"),
        ("locate", "--distance", "1km", "--ior", "1.468", "--job", "1a", "--link", "L"),
        ("reference", "--level", "-7", "--wavelength", "1310", "--job", "1a", "--link", "L"),
        ("jobs", "new", "x"),
    ],
)
def test_a_data_folder_that_is_a_file_is_named_in_one_line(
    tmp_path: Path, args: tuple[str, ...]
) -> None:
    not_a_folder = tmp_path / "data-file"
    not_a_folder.write_text("x", encoding="utf-8")
    result = run("--data-dir", str(not_a_folder), *args)
    assert_refused(result, "not a directory")
    assert not_a_folder.read_text(encoding="utf-8") == "x"


@pytest.fixture
def read_only_jobs(isolated_dirs: dict[str, Path]) -> Iterator[tuple[str, Path]]:
    """A job whose jobs folder cannot be written: chmod, or ``chattr +i`` when run as root."""
    job_id = _new_job("read only")
    jobs_dir = isolated_dirs["data"] / "jobs"
    folders = [jobs_dir, *[p for p in jobs_dir.iterdir() if p.is_dir()]]
    immutable = False
    for folder in folders:
        folder.chmod(0o555)
    probe = jobs_dir / ".probe"
    try:
        probe.touch()
    except OSError:
        pass
    else:  # root ignores modes: make the folders immutable instead, if the tool is there
        probe.unlink()
        if (
            shutil.which("chattr") is None
            or subprocess.run(["chattr", "+i", *map(str, folders)], capture_output=True).returncode
            != 0
        ):
            for folder in folders:
                folder.chmod(0o755)
            pytest.skip("cannot make a folder read-only here")
        immutable = True
    try:
        yield job_id, jobs_dir
    finally:
        if immutable:
            subprocess.run(["chattr", "-i", *map(str, folders)], check=True)
        for folder in folders:
            folder.chmod(0o755)


@pytest.mark.parametrize(
    "args",
    [
        ("jobs", "note", "{id}", "hello"),
        ("jobs", "done", "{id}"),
        ("jobs", "new", "another"),
        ("budget", "--fibre-type", "OS2", "--length", "5km", "--job", "{id}", "--link", "L"),
        ("reference", "--level", "-7", "--wavelength", "1310", "--job", "{id}", "--link", "L"),
        ("locate", "--distance", "1km", "--ior", "1.468", "--job", "{id}", "--link", "L"),
    ],
)
def test_a_read_only_jobs_folder_refuses_in_one_line_and_keeps_the_job(
    read_only_jobs: tuple[str, Path],
    args: tuple[str, ...],
) -> None:
    job_id, jobs_dir = read_only_jobs
    job_file = jobs_dir / f"{job_id}.json"
    before = job_file.read_bytes()
    result = run(*(a.replace("{id}", job_id) for a in args))
    assert_refused(result)
    assert job_file.read_bytes() == before
    assert sorted(p.name for p in jobs_dir.glob("*.json")) == [job_file.name]
    # reading still works
    assert run("jobs", "show", job_id).returncode == 0


def test_a_broken_user_override_is_named_when_the_shipped_preset_is_used(
    isolated_dirs: dict[str, Path],
) -> None:
    presets = isolated_dirs["config"] / "presets"
    presets.mkdir(parents=True)
    (presets / "my-fibres.toml").write_text(
        '[[fibres]]\nname = "OS2"\nfamily = "singlemode"\nstandard = "site cable"\n'
        "default_wavelengths_nm = [1310]\nattenuation_max_db_per_km = { 1310 = nan }\n"
        'source = "datasheet"\n',
        encoding="utf-8",
    )
    result = run(
        "budget", "--fibre-type", "OS2", "--length", "5km", "--wavelength", "1310", "--json"
    )
    assert result.returncode == 0, result.stderr
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1, result.stderr
    assert "warning" in lines[0] and "my-fibres.toml" in lines[0] and "'OS2'" in lines[0]
    # the shipped OS2 was used: 0.4 dB/km max at 1310 nm (presets/fibres.toml) × 5 km = 2.0 dB
    items = json.loads(result.stdout)["wavelengths"][0]["items"]
    assert items[0]["loss_db"] == pytest.approx(2.0, abs=1e-9)
    located = run("locate", "--distance", "1 km", "--fibre-type", "OS2", "--wavelength", "1310")
    assert located.returncode == 0, located.stderr
    assert "my-fibres.toml" in located.stderr


def test_good_presets_give_no_warning() -> None:
    result = run("budget", "--fibre-type", "OS2", "--length", "5km")
    assert result.returncode == 0
    assert result.stderr == ""


# -- free text: escape sequences, line breaks and bytes that are not UTF-8 -------------------

# os.fsdecode turns the byte 0xff into the lone surrogate U+DCFF, as Python does for argv
_NOT_UTF8 = os.fsdecode(b"\xff")


@pytest.mark.parametrize(
    ("args", "words"),
    [
        (("jobs", "new", "a\nb"), ("name", "U+000A")),
        (("jobs", "new", "\x1b[31mred\x1b[0m"), ("name", "U+001B")),
        (("jobs", "new", _NOT_UTF8), ("name", "not UTF-8")),
        (("jobs", "new", "ok", "--crew", _NOT_UTF8), ("crew", "not UTF-8")),
        (("jobs", "new", "ok", "--site", "x\ty"), ("site", "U+0009")),
        (("jobs", "new", "ok", "--by", "\x1b[2J"), ("by", "U+001B")),
        (
            ("budget", "--fibre-type", "OS2", "--length", "1km", "--job", "{id}", "--link", "a\nb"),
            ("link", "U+000A"),
        ),
        (
            ("locate", "--distance", "1km", "--ior", "1.468", "--landmark", "\x1b[1m:1 km:1 km"),
            ("landmark name", "U+001B"),
        ),
        (
            (
                "locate",
                "--distance",
                "1km",
                "--ior",
                "1.468",
                "--job",
                "{id}",
                "--link",
                "L",
                "--by",
                _NOT_UTF8,
            ),
            ("by", "not UTF-8"),
        ),
    ],
)
def test_control_characters_and_broken_text_are_refused_before_any_write(
    isolated_dirs: dict[str, Path],
    args: tuple[str, ...],
    words: tuple[str, ...],
) -> None:
    job_id = _new_job("target")
    jobs_dir = isolated_dirs["data"] / "jobs"
    before = (jobs_dir / f"{job_id}.json").read_bytes()
    assert_refused(run(*(a.replace("{id}", job_id) for a in args)), *words)
    assert sorted(p.name for p in jobs_dir.glob("*.json")) == [f"{job_id}.json"]
    assert (jobs_dir / f"{job_id}.json").read_bytes() == before


def test_a_note_keeps_its_line_breaks_and_accents() -> None:
    job_id = _new_job("Café à Zürich – Ω")
    result = run("jobs", "note", job_id, "splice tray 3\nrecheck\tfibre 12", "--by", "Zoë")
    assert result.returncode == 0, result.stderr
    job = json.loads(run("jobs", "show", job_id, "--json").stdout)["job"]
    assert job["name"] == "Café à Zürich – Ω"
    assert job["notes"][-1]["text"] == "splice tray 3\nrecheck\tfibre 12"
    assert_refused(run("jobs", "note", job_id, "\x1b[2J"), "note", "U+001B")


def test_a_handoff_whose_job_repeats_a_record_id_imports_nothing(
    tmp_path: Path,
    isolated_dirs: dict[str, Path],
) -> None:
    job_id = _new_job("source")
    assert run("jobs", "note", job_id, "first").returncode == 0
    handoff = tmp_path / "handoff.json"
    assert run("jobs", "export", job_id, "--format", "json", "-o", str(handoff)).returncode == 0
    data = json.loads(handoff.read_text(encoding="utf-8"))
    notes = data["jobs"][0]["notes"]
    notes.append(dict(notes[0], text="same id, other text"))
    handoff.write_text(json.dumps(data), encoding="utf-8")
    jobs_dir = isolated_dirs["data"] / "jobs"
    (jobs_dir / f"{job_id}.json").unlink()  # import into a store without the job
    result = run("jobs", "import", str(handoff))
    assert_refused(result, "twice", "nothing imported", notes[0]["id"])
    assert not list(jobs_dir.glob("*.json"))
