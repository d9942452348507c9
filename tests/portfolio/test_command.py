"""``homeplan portfolio`` and ``homeplan community`` as a user runs them: exit codes, messages,
files, resume."""

from __future__ import annotations

import pytest

from homeplan.cli import main
from homeplan.cli.portfolio import progress_line
from homeplan.portfolio.runner import Progress

from .conftest import HOMES


def _run(community, out, *extra):
    return main(["portfolio", str(community[0]), "--template", str(community[1]), "-o", str(out),
                 "--workers", "0", "--quiet", *extra])


def test_a_run_a_second_run_and_a_resume(community, tmp_path, capsys):
    out = tmp_path / "results"
    assert _run(community, out, "--limit", "3") == 0
    text = capsys.readouterr()
    assert f"3 of {HOMES} homes" in text.out and "--resume" in text.out
    for name in ("years.csv", "years.parquet", "homes.csv", "summary.html", "portfolio.sqlite"):
        assert (out / name).is_file(), name
    assert _run(community, out) == 2                       # will not write over a run
    assert "already holds a portfolio run" in capsys.readouterr().err
    assert _run(community, out, "--resume") == 0
    assert f"{HOMES} of {HOMES} homes" in capsys.readouterr().out
    assert _run(community, out, "--resume") == 0
    assert "already planned" in capsys.readouterr().err


def test_resume_refuses_a_changed_input(community, tmp_path, capsys):
    out = tmp_path / "results"
    assert _run(community, out, "--limit", "1") == 0
    changed = tmp_path / "homes.csv"
    changed.write_text(community[0].read_text() + "\n")
    code = main(["portfolio", str(changed), "--template", str(community[1]), "-o", str(out),
                 "--workers", "0", "--resume", "--quiet"])
    assert code == 2 and "input has changed" in capsys.readouterr().err


@pytest.mark.parametrize("args, words", [
    (["nowhere.csv", "-o", "r"], "not found"),
    (["{csv}", "-o", "r"], "needs a template"),
    (["{csv}", "--template", "{tpl}", "-o", "r", "--coincidence", "2,0.5"], "--coincidence"),
    (["{csv}", "--template", "{tpl}", "-o", "r", "--program-budget", "x"], "PROGRAM=USD"),
])
def test_bad_input_exits_2_with_a_message(community, tmp_path, monkeypatch, capsys, args, words):
    monkeypatch.chdir(tmp_path)
    args = [a.format(csv=community[0], tpl=community[1]) for a in args]
    assert main(["portfolio", *args, "--workers", "0"]) == 2
    assert words in capsys.readouterr().err
    assert not (tmp_path / "r").exists()


def test_a_scheduler_must_be_an_address(capsys):
    with pytest.raises(SystemExit) as err:
        main(["portfolio", "x.csv", "-o", "r", "--scheduler", "localhost"])
    assert err.value.code == 2 and "tcp://HOST:8786" in capsys.readouterr().err


def test_the_progress_line():
    p = Progress(stored_now=412, to_plan=1000, stored_total=412, total=1000, problems=3,
                 elapsed_s=60.0, rate_per_s=6.8)
    line = progress_line(p)
    assert line.startswith("[##########--------------]") and " 412/1000 homes" in line
    assert "6.8 homes/s" in line and "about 1 min 26 s left" in line and "3 with problems" in line
    assert "starting" in progress_line(Progress(0, 10, 0, 10, 0, 1.0, None))


def test_the_community_command(tmp_path, capsys):
    assert main(["community", str(tmp_path / "c"), "--homes", "5", "--seed", "9"]) == 0
    assert (tmp_path / "c" / "homes.csv").read_text().count("\n") == 6
    assert "homeplan portfolio" in capsys.readouterr().out


def test_an_unreachable_cluster_fails_cleanly(community, tmp_path, monkeypatch, capsys):
    from homeplan.cli import portfolio as cli
    from homeplan.portfolio.runner import DaskExecutor

    with pytest.raises(ConnectionError, match="cannot reach the dask scheduler"):
        DaskExecutor("tcp://127.0.0.1:9", timeout_s=1.0)   # port 9: nothing listens there

    def refuse(workers, scheduler):  # noqa: ARG001 - the runner's interface
        raise ConnectionError(f"cannot reach the dask scheduler at {scheduler}")

    monkeypatch.setattr(cli, "make_executor", refuse)
    out = tmp_path / "results"
    assert _run(community, out, "--scheduler", "tcp://127.0.0.1:9") == 1
    assert "check the address" in capsys.readouterr().err
    assert not out.exists()                                  # nothing left behind to resume
