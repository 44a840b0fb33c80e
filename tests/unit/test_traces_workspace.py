"""What the Traces workspace decides, at unit speed: the empty workspace's hint, the table it
shows, the selection and the hand-off to Fault, which job's link Ctrl+S offers, the caution
that fits, and the save's status line. The Pilot tests keep only the wiring of these."""

from __future__ import annotations

from pathlib import Path

import pytest

from fieldkit import safety
from fieldkit.actions.traces import (
    SavedTraces,
    link_origin,
    links_named,
    load_link,
    pair_record,
    presets_limits,
)
from fieldkit.jobs.demo import build, local_day_start
from fieldkit.jobs.ids import now
from fieldkit.jobs.store import JobStore
from fieldkit.text.layout import wrap
from fieldkit.traces.demo import demo_trace_files
from fieldkit.traces.lines import otdr_caution
from fieldkit.traces.model import TraceFileError
from fieldkit.traces.session import TraceSession, is_folder, row_number, start_hint
from fieldkit.traces.sor import write_sor
from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace

BACKBONE = "de30000000000001"  # the demo job holding link LIB-TH-01 (fieldkit/jobs/demo.py)

# a 4 km fibre with one 0.25 dB splice at 1500 m (the physical model, synthetic.py)
FIBRE = SynthFibre(
    length_m=4000.0, spacing_m=1.0, dynamic_range_db=18.0, events=(SynthEvent(1500.0, 0.25),)
)


@pytest.fixture(scope="module")
def pair_files(tmp_path_factory: pytest.TempPathFactory) -> tuple[str, str]:
    out = tmp_path_factory.mktemp("pair")
    ab, ba = out / "F1_AB.sor", out / "F1_BA.sor"
    ab.write_bytes(write_sor(synth_trace(FIBRE, seed=1)))
    ba.write_bytes(write_sor(synth_trace(FIBRE.reversed(), seed=2)))
    return str(ab), str(ba)


@pytest.fixture(scope="module")
def demo(tmp_path_factory: pytest.TempPathFactory) -> tuple[JobStore, Path]:
    """The demo jobs in a store, and the demo's trace files in a folder called ``unsorted``
    (a name that names no link: only the records' cable id LIB-TH-01 does)."""
    root = tmp_path_factory.mktemp("demo")
    store = JobStore(root / "jobs")
    for job in build(local_day_start(now())):
        store.save(job)
    folder = root / "unsorted"
    folder.mkdir()
    for name, blob in demo_trace_files().items():
        (folder / name).write_bytes(blob)
    return store, folder


# -- the empty workspace ---------------------------------------------------------------------
def test_the_hint_names_the_first_trace_folder_kept_with_the_jobs(tmp_path: Path) -> None:
    # `fieldkit demo` keeps its trace files in <data folder>/traces/LIB-TH-01: a user who has
    # never seen them is told where they are, as an example of what to type
    assert start_hint(tmp_path) == (
        "Type a trace file (and the other end's) or a folder, then Enter."
    )
    (tmp_path / "traces" / "ZZ-2").mkdir(parents=True)
    (tmp_path / "traces" / "LIB-TH-01").mkdir()
    (tmp_path / "traces" / "a-file.sor").write_bytes(b"")  # a file is no example of a folder
    assert start_hint(tmp_path).endswith(f"e.g. {tmp_path / 'traces' / 'LIB-TH-01'}")


def test_a_typed_folder_is_told_from_a_file(tmp_path: Path, pair_files: tuple[str, str]) -> None:
    assert is_folder(f"  {tmp_path}  ")
    assert not is_folder(pair_files[0]) and not is_folder("   ") and not is_folder("")


# -- the table, the selection, the hand-off ---------------------------------------------------
def test_the_table_view_keys_each_event_row_by_its_number(pair_files: tuple[str, str]) -> None:
    s = TraceSession()
    assert s.table(True).columns == () and s.table(True).rows == ()  # nothing open
    s.open(*pair_files)
    view = s.table(wide=False)
    assert view.title.startswith("Events, both directions averaged")
    assert view.columns == ("#", "from A", "kind", "avg dB", "verdict")
    assert [key for key, _ in view.rows] == ["event-1", "event-2"]
    assert all(len(cells) == len(view.columns) for _, cells in view.rows)


def test_selection_goes_with_what_is_open_and_picks_what_fault_gets(
    pair_files: tuple[str, str],
) -> None:
    s = TraceSession()
    with pytest.raises(TraceFileError, match="open a trace"):
        s.handoff()
    s.open(*pair_files)
    assert s.select(1) and not s.select(1)  # the second time nothing changes
    hand = s.handoff()  # the splice at 1500 m (event 1), not the end
    assert hand.distance_m == pytest.approx(1500.0, abs=3.0) and "event 1" in hand.note
    s.instrument_table = True  # the instrument's numbers are not ours: the end goes
    assert s.handoff().distance_m == pytest.approx(4000.0, abs=2.0)
    s.instrument_table = False
    s.cycle_view()
    assert s.selected is None  # another view, another table: nothing selected
    s.select(2)
    s.open(pair_files[0])
    assert s.selected is None


def test_a_folders_fibre_opens_by_its_row_and_esc_goes_back(demo: tuple[JobStore, Path]) -> None:
    s = TraceSession()
    s.open_folder(str(demo[1]))
    assert s.anything_open and not s.can_go_back
    view = s.table(wide=True)
    assert view.title == "Fibres (Enter opens one)" and [k for k, _ in view.rows] == [
        "fibre-0",
        "fibre-1",
    ]
    assert s.folder_status() == "4 files, 2 fibres, 1 failed; Enter on a fibre opens it"
    assert s.open_fibre(1).startswith("pair: ") and s.can_go_back
    with pytest.raises(TraceFileError, match="no fibre 3"):
        s.open_fibre(2)
    assert s.close_fibre() and not s.can_go_back and s.whole_folder


def test_the_note_says_the_shipped_limits_judge_until_a_link_does() -> None:
    s = TraceSession()
    assert s.judged_by_defaults
    [notice] = s.note_lines("", wide=True)
    assert notice.startswith("Shipped default limits (") and "^S" in notice
    assert s.note_lines("loss 0.12 dB", wide=False)[0] == "loss 0.12 dB"
    s.set_limits(s.settings.limits.__class__(origin="link 'L1' of job 'J'"))
    assert s.note_lines("", wide=True) == [] and not s.judged_by_defaults


def test_closures_without_a_route_position_are_no_landmarks() -> None:
    s = TraceSession()
    s.use_closures([("JC-1", 1200.0), ("JC-2", None), ("HH-3", 0.0)])
    assert [(c.name, c.route_m) for c in s.closures] == [("JC-1", 1200.0), ("HH-3", 0.0)]


# -- which job's link Ctrl+S offers ----------------------------------------------------------
def test_the_records_cable_id_names_the_demo_backbone(demo: tuple[JobStore, Path]) -> None:
    """A file whose folder and name say nothing: the record's cable id (LIB-TH-01) names the
    demo's backbone link, and it is the one offered (review A5)."""
    store, folder = demo
    s = TraceSession()
    s.open(str(folder / "F07_1550_AB.sor"))
    assert "LIB-TH-01" in s.names()
    found = links_named(store, s.names())
    link = store.load(BACKBONE).link_by_label("LIB-TH-01")
    assert link is not None and found == [(BACKBONE, link.id)]
    assert s.offered_link(found) == (BACKBONE, link.id)


def test_no_name_offers_the_last_link_chosen_and_several_do_too(
    demo: tuple[JobStore, Path],
) -> None:
    store, _ = demo
    s = TraceSession()
    assert links_named(store, ["nothing-like-a-link"]) == []
    assert s.offered_link([]) is None  # nothing chosen before: no job picked
    s.last_link = ("j2", "l2")
    assert s.offered_link([]) == ("j2", "l2")
    assert s.offered_link([("j1", "l1"), ("j3", "l3")]) == ("j2", "l2")
    assert s.offered_link([("j1", "l1")]) == ("j1", "l1")  # one named link beats the last


# -- the caution and the save's status line --------------------------------------------------
@pytest.mark.parametrize(
    ("width", "wide", "expected"),
    [
        (78, True, safety.OTDR_LIVE_FIBRE_MEDIUM),  # 80 columns less the padding: two lines
        (70, True, safety.OTDR_LIVE_FIBRE_SHORT),  # three lines there: the short one
        (120, False, safety.OTDR_LIVE_FIBRE_SHORT),  # a narrow layout always takes the short
    ],
)
def test_the_otdr_caution_that_fits_two_lines(width: int, wide: bool, expected: str) -> None:
    assert otdr_caution(width, wide) == expected
    if expected == safety.OTDR_LIVE_FIBRE_MEDIUM:
        assert len(wrap(expected, width, 0)) <= 2


def test_the_save_status_is_a_sentence_with_arrows(
    demo: tuple[JobStore, Path], pair_files: tuple[str, str]
) -> None:
    store, _ = demo
    job = store.load(BACKBONE)
    link = job.links[0]
    assert link_origin(job, link) == f"link {link.label!r} of job {job.name!r}"
    s = TraceSession()
    s.open(*pair_files)
    assert s.paired is not None
    record = pair_record(s.paired, fibre=1)
    saved = SavedTraces(job.id, job.name, link.id, link.label, (record,), 1)
    assert saved.summary().startswith("saved 1 trace (fibre 1 A<->B")  # the CLI's, stored form
    # the workspace's: a sentence, the pair's direction as people read it (text/numbers.py)
    assert saved.status() == "S" + saved.summary()[1:].replace("A<->B", "A↔B")
    assert saved.status().endswith("; 1 earlier kept as superseded")


def test_row_keys_read_back_as_their_number() -> None:
    assert row_number("event-12", "event") == 12 and row_number("fibre-0", "fibre") == 0
    assert row_number("fibre-3", "event") is None and row_number("", "fibre") is None


def test_a_links_presets_judge_and_say_so(demo: tuple[JobStore, Path], tmp_path: Path) -> None:
    store, _ = demo
    job, link = load_link(store, BACKBONE, "LIB-TH-01")  # by label, as the CLI's --link
    assert load_link(store, BACKBONE, link.id)[1].id == link.id  # and by id
    shipped = presets_limits(tmp_path)  # no user presets in this folder
    assert shipped.origin == "the shipped presets"
    judged = presets_limits(tmp_path, job, link)
    assert judged.origin == f"link {link.label!r} of job {job.name!r}"
    s = TraceSession()
    s.set_limits(judged)
    assert not s.judged_by_defaults and s.note_lines("", wide=True) == []


def test_the_handoff_carries_the_chosen_links_closures() -> None:
    """Ctrl+G sends the link's closures that match events as landmarks (traces.closures)."""
    from fieldkit.traces.analysis import analyse_trace
    from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace

    fibre = SynthFibre(
        length_m=4000.0, spacing_m=1.0, dynamic_range_db=18.0, events=(SynthEvent(1500.0, 0.25),)
    )
    s = TraceSession(a=analyse_trace(synth_trace(fibre, seed=1)))
    assert s.handoff().landmarks == ()  # no link chosen: none
    s.use_closures([("JC-7", 1480.0), ("JC-far", 3900.0)])
    (name, otdr_m, route_m), *rest = s.handoff().landmarks  # the break, with JC-7
    assert name == "JC-7" and otdr_m == pytest.approx(1500.0, abs=2.0) and route_m == 1480.0
    assert rest == []  # no event near 3900 m of route but the end, which is no closure


def test_the_demo_splice_at_jc3_is_its_closure(demo: tuple[JobStore, Path]) -> None:
    """The demo's JC-3 Market Street (route 1150 m; its splice 1162 m along the fibre, a 1 %
    helix: traces.demo) is the closure by the one rule, and the break's hand-off carries it."""
    from fieldkit.actions.traces import closures_of

    store, folder = demo
    s = TraceSession()
    s.open(str(folder / "F07_1550_AB.sor"), str(folder / "F07_1550_BA.sor"))
    s.use_closures(closures_of(store, s.offered_link(links_named(store, s.names()))))
    assert [c.name for c in s.closures] == ["JC-3 Market Street"]
    kinds = {row[0]: row[2] for row in s.rows(wide=True)}
    splice = next(e for e in s.marks() if abs(e.distance_m - 1162.0) < 5.0)
    assert kinds[str(splice.number)] == "splice"  # not "splice/bend": the closure is there
    name, otdr_m, route_m = s.handoff().landmarks[0]
    assert name == "JC-3 Market Street" and route_m == 1150.0
    assert otdr_m == pytest.approx(1162.0, abs=3.0)
