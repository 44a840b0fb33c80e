"""``fieldkit`` builds only the part of its parser a command line needs, and still refuses and
helps as the full parser does."""

from __future__ import annotations

import pytest

from fieldkit import cli


@pytest.mark.parametrize(
    "argv",
    [[], ["--data-dir", "/tmp/x"], ["--config-dir=/tmp/c"], ["--data", "demo"]],
)
def test_starting_the_ui_imports_no_command(argv: list[str]) -> None:
    # "--data demo": argparse takes "--data" for --data-dir, so "demo" is its folder
    assert cli._needed_modules(argv) == ((), None)


def test_a_named_command_needs_its_own_module_only() -> None:
    assert cli._needed_modules(["demo", "--no-ui"]) == (("fieldkit.commands.demo",), "demo")
    assert cli._needed_modules(["--data-dir", "d", "presets"]) == (
        ("fieldkit.commands.presets_cmd",),
        "presets",
    )


@pytest.mark.parametrize("argv", [["--help"], ["-h"], ["--version"], ["nosuch"]])
def test_help_and_unknown_names_get_every_command(argv: list[str]) -> None:
    assert cli._needed_modules(argv)[0] == cli.COMMAND_MODULES


def test_an_unknown_command_is_refused_with_the_list_of_commands(
    capsys: pytest.CaptureFixture[str],
) -> None:
    with pytest.raises(SystemExit) as exit_info:
        cli.main(["nosuch"])
    assert exit_info.value.code == 2
    err = capsys.readouterr().err
    assert "invalid choice: 'nosuch'" in err and "'convert'" in err and "'demo'" in err


def test_a_command_named_alone_runs_as_with_the_full_parser(
    capsys: pytest.CaptureFixture[str],
) -> None:
    # ITU-T G.694.1: 193.1 THz is 1552.52 nm (c / f, c = 299 792 458 m/s)
    assert cli.main(["convert", "193.1 THz", "--to", "nm"]) == 0
    assert capsys.readouterr().out.startswith("1552.52")


def test_a_command_runs_with_the_collector_on_and_main_leaves_it_as_found(
    monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]
) -> None:
    # The collector is off only while the UI loads (cli.main); a command's own work (a folder
    # of 288 traces, say) collects as usual, and the caller's setting is kept either way.
    import gc

    seen: list[bool] = []

    def spy(args: object) -> int:
        seen.append(gc.isenabled())
        return 0

    original = cli._build

    def build(modules: tuple[str, ...]) -> tuple[object, set[str]]:  # convert, spied on
        parser, names = original(modules)
        parser._subparsers._group_actions[0].choices["convert"].set_defaults(func=spy)
        return parser, names

    monkeypatch.setattr(cli, "_build", build)
    assert gc.isenabled()
    assert cli.main(["convert", "1 mW"]) == 0
    assert seen == [True] and gc.isenabled()
    gc.disable()
    try:
        assert cli.main(["convert", "1 mW"]) == 0
        assert seen == [True, False] and not gc.isenabled()
    finally:
        gc.enable()
