"""Budget files and exports under attack: nothing lost, nothing foreign overwritten, nothing injected.

Every case here failed on main before deltakit had one writer (issue 11):
loading deep or huge JSON escaped as RecursionError/ValueError, a save through
a symbolic link replaced the link, to_csv overwrote any file, killed saves
left orphans, and labels reached LaTeX and Markdown as live markup.
The vehicles are invented for the tests.
"""

from __future__ import annotations

import json
import os
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

import deltakit as dk
from deltakit import Budget
from deltakit.budget import FORMAT, VERSION
from deltakit.margins import STUDY_POLICY

DATA = Path(__file__).resolve().parent / "data"


def skiff() -> Budget:
    """An invented tug with two systems, a stage, every kind of line and a policy."""
    b = Budget(name="Skiff & co", dry_mass=700.0, dry_maturity="modified", policy=STUDY_POLICY)
    b.stage("kick", 150.0, drop="spent", maturity="off-the-shelf")
    b.system("main", 3150.0, 900.0, residual=0.01)
    b.system("thrusters", 2200.0, 40.0)
    b.system("kick motor", 2900.0, 800.0, stage="kick")
    b.add("departure", dk.hohmann(7e6, 9e6, 3.986004418e14), system="kick motor", category="deterministic")
    b.add("corrections", 15.0, system="thrusters", category="statistical")
    b.jettison("release probe", 80.0)
    b.add_mass("pick up canister", 20.0)
    b.add("arrival", 600.0, margin=0.02)
    return b


# ---------------------------------------------------------------------- round trips and migration
def test_a_vehicle_round_trips_with_everything(tmp_path):
    b = skiff()
    path = b.save(tmp_path / "skiff.json")
    data = json.loads(path.read_text())
    assert data["format"] == FORMAT and data["version"] == VERSION == 2
    assert [s["name"] for s in data["systems"]] == ["main", "thrusters", "kick motor"]
    assert data["stages"][0]["drop"] == "spent" and data["policy"]["name"] == STUDY_POLICY.name
    assert [line["kind"] for line in data["lines"]] == ["burn", "burn", "jettison", "add_mass", "burn"]
    loaded = Budget.load(path)
    assert loaded == b and loaded.lines == b.lines
    assert loaded.usage["kick motor"].dropped == b.usage["kick motor"].dropped
    assert float(loaded.final_mass) == float(b.final_mass)


def test_a_file_written_by_main_loads_and_is_saved_in_the_new_version(tmp_path):
    old = DATA / "budget_v1_main.json"
    assert json.loads(old.read_text())["version"] == 1
    before = old.read_bytes()
    b = Budget.load(old)
    assert old.read_bytes() == before  # loading never writes
    assert b.name == "Tamsin relay tug (written by main)" and len(b) == 3
    assert b.lines[1].source["kind"] == "transfer" or b.lines[1].source == {"kind": "number"}
    assert b.lines[2].source["type"] == "Transfer"
    copy = tmp_path / "budget.json"
    shutil.copy(old, copy)
    b.save(copy)  # a version 1 budget is ours: replaced by the version 2 file
    assert json.loads(copy.read_text())["version"] == 2
    assert Budget.load(copy) == b


def test_a_version_1_file_with_a_percent_margin_is_refused_with_the_fraction(tmp_path):
    data = json.loads((DATA / "budget_v1_main.json").read_text())
    data["lines"][0]["margin"] = 25.0  # meant 25 %, read by main as +2500 %
    path = tmp_path / "old.json"
    path.write_text(json.dumps(data))
    with pytest.raises(dk.DomainError, match=r"old.json .*line 1: `margin` .*did you mean 0.25\?.*version 1"):
        Budget.load(path)


def _damaged_v2(good: dict) -> dict[str, tuple[object, str]]:
    lines = good["lines"]
    return {
        "unknown kind": (dict(good, lines=[dict(lines[0], kind="teleport")]), "unknown kind"),
        "system on no stage": (
            dict(good, systems=[dict(good["systems"][0], stage="nowhere"), *good["systems"][1:]]),
            "`stage` 'nowhere'",
        ),
        "line of no system": (
            dict(good, lines=[dict(lines[0], system="warp drive")]),
            "`system` 'warp drive'",
        ),
        "main not a system": (dict(good, main_system="ghost"), "`main_system`"),
        "policy not an object": (dict(good, policy=[1, 2]), "`policy`"),
        "jettison too big": (
            dict(good, lines=[*lines[:2], dict(lines[2], mass_kg=1e6), *lines[3:]]),
            "`mass`",
        ),
        "stages not a list": (dict(good, stages={"a": 1}), "`stages` must be a list"),
        "huge number": (dict(good, dry_mass_kg=10**400), "too large"),
    }


@pytest.mark.parametrize("case", list(_damaged_v2(skiff().to_dict())))
def test_damaged_version_2_files_are_refused_and_left_untouched(tmp_path, case):
    content, message = _damaged_v2(skiff().to_dict())[case]
    path = tmp_path / "damaged.json"
    path.write_text(json.dumps(content))
    stat = path.stat()
    with pytest.raises(dk.DomainError, match=message) as info:
        Budget.load(path)
    assert str(path) in str(info.value)
    assert path.stat().st_mtime_ns == stat.st_mtime_ns and json.loads(path.read_text()) == content


@pytest.mark.parametrize(
    "content, message",
    [
        ("[" * 100_000 + "]" * 100_000, "nested far deeper"),
        ('{"format": "deltakit.budget", "version": 1, "m0_kg": ' + "9" * 5000 + "}", "number beyond reason"),
        ('{"format": "deltakit.budget", "version": ' + "9" * 400 + "}", "no valid version"),
        (
            '{"format": "deltakit.budget", "version": 1, "m0_kg": 1e999, "ve_m_per_s": 3000, "lines": []}',
            "`m0`",
        ),
        (
            '{"format": "deltakit.budget", "version": 1, "m0_kg": NaN, "ve_m_per_s": 3000, "lines": []}',
            "`m0`",
        ),
    ],
    ids=["deep nesting", "five thousand digits", "huge version", "overflowing float", "NaN"],
)
def test_hostile_json_is_a_domain_error_naming_the_file(tmp_path, content, message):
    path = tmp_path / "hostile.json"
    path.write_text(content)
    with pytest.raises(dk.DomainError, match=message) as info:
        Budget.load(path)
    assert str(path) in str(info.value)
    assert path.read_text() == content


def test_a_huge_file_is_refused_before_it_is_read(tmp_path):
    path = tmp_path / "huge.json"
    with open(path, "wb") as handle:
        handle.truncate(200 * 1024 * 1024)  # sparse: no disk used
    with pytest.raises(dk.DomainError, match="far more than any budget"):
        Budget.load(path)


# ---------------------------------------------------------------------- links, orphans, kills, concurrency
def test_saving_through_a_symlink_updates_the_target_and_keeps_the_link(tmp_path):
    real = tmp_path / "store" / "skiff.json"
    real.parent.mkdir()
    skiff().save(real)
    link = tmp_path / "current.json"
    link.symlink_to(real)
    skiff().add("one more", 5.0).save(link)
    assert link.is_symlink() and os.readlink(link) == str(real)
    assert len(Budget.load(real)) == len(skiff()) + 1
    assert sorted(p.name for p in tmp_path.iterdir()) == ["current.json", "store"]


def _dead_pid() -> int:
    run = subprocess.run(
        [sys.executable, "-c", "import os; print(os.getpid())"], capture_output=True, text=True
    )
    return int(run.stdout)


@pytest.mark.parametrize("action", ["save", "load"])
def test_orphans_of_killed_saves_are_gone_after_the_next_save_or_load(tmp_path, action):
    path = skiff().save(tmp_path / "skiff.json")
    dead = _dead_pid()
    for n in range(18):
        (tmp_path / f".skiff.json.{dead}.{n:08x}.deltakit-tmp").write_text('{"format": "deltakit.bud')
    if action == "save":
        skiff().save(path)
    else:
        Budget.load(path)
    assert [p.name for p in tmp_path.iterdir()] == ["skiff.json"]


SAVER = """
import sys
from deltakit import Budget
b = Budget(2000.0, 3100.0, name=sys.argv[2], dry_mass=800.0)
padding = "x" * int(sys.argv[5]) if len(sys.argv) > 5 else ""
for i in range(int(sys.argv[3])):
    b.add(f"line {i} {padding}", 1.0)
print("ready", flush=True)
for _ in range(int(sys.argv[4])):
    b.save(sys.argv[1])
"""


def test_two_processes_saving_at_once_keep_a_loadable_file(tmp_path):
    path = skiff().save(tmp_path / "shared.json")
    children = [
        subprocess.Popen(
            [sys.executable, "-c", SAVER, str(path), name, "200", "60"], stdout=subprocess.PIPE, text=True
        )
        for name in ("first writer", "second writer")
    ]
    try:
        for child in children:
            assert child.stdout.readline().strip() == "ready"
        loads = 0
        while any(child.poll() is None for child in children):
            assert Budget.load(path).name in ("Skiff & co", "first writer", "second writer")
            loads += 1
        assert all(child.wait() == 0 for child in children)
    finally:
        for child in children:
            child.kill()
            child.wait()
    assert loads > 0
    assert Budget.load(path).name in ("first writer", "second writer")
    assert [p.name for p in tmp_path.iterdir()] == ["shared.json"]


def test_kill_9_during_a_save_keeps_a_loadable_file(tmp_path):
    path = skiff().save(tmp_path / "big.json")
    child = subprocess.Popen(
        [sys.executable, "-c", SAVER, str(path), "killed writer", "3000", "1000000", "3000"],
        stdout=subprocess.PIPE,
        text=True,
    )
    try:
        assert child.stdout.readline().strip() == "ready"
        deadline = time.monotonic() + 60
        while not any(p.name.endswith(".deltakit-tmp") for p in tmp_path.iterdir()):
            assert time.monotonic() < deadline, "the child never started a save"
            time.sleep(0.0005)
    finally:
        child.send_signal(signal.SIGKILL)
        child.wait()
    assert Budget.load(path).name in ("Skiff & co", "killed writer")  # whole, old or new
    skiff().save(path)  # the next save cleans the orphan up
    assert [p.name for p in tmp_path.iterdir()] == ["big.json"]


# ---------------------------------------------------------------------- exports never overwrite a stranger
EXPORTS = {
    "csv": lambda b, path, **kw: b.to_csv(path, **kw),
    "markdown": lambda b, path, **kw: b.to_markdown(path, **kw),
    "latex": lambda b, path, **kw: b.to_latex(path, **kw),
}


@pytest.mark.parametrize("fmt", list(EXPORTS))
def test_exports_replace_their_own_kind_and_refuse_anything_else(tmp_path, fmt):
    export = EXPORTS[fmt]
    path = tmp_path / f"skiff.{fmt}"
    export(skiff(), path)
    first = path.read_text()
    export(skiff().add("more", 1.0), path)  # our own export of the same kind: replaced
    assert path.read_text() != first
    other_kind = {"csv": "markdown", "markdown": "latex", "latex": "csv"}[fmt]
    EXPORTS[other_kind](skiff(), tmp_path / "other.txt")
    strangers = {
        "thesis": b"three years of work\n",
        "budget": skiff().save(tmp_path / "saved.json").read_bytes(),
        "other export": (tmp_path / "other.txt").read_bytes(),
    }
    for name, content in strangers.items():
        target = tmp_path / f"{name}.target"
        target.write_bytes(content)
        with pytest.raises(dk.DomainError, match="refusing to overwrite .*overwrite=True"):
            export(skiff(), target)
        assert target.read_bytes() == content, name
    export(skiff(), tmp_path / "thesis.target", overwrite=True)
    assert (tmp_path / "thesis.target").read_text() == (
        skiff().to_csv() if fmt == "csv" else export(skiff(), None)
    )
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".deltakit-tmp")]


def test_a_csv_export_written_by_main_is_recognised_as_ours(tmp_path):
    path = tmp_path / "budget.csv"
    shutil.copy(DATA / "budget_v1_main.csv", path)
    Budget.load(DATA / "budget_v1_main.json").to_csv(path)
    assert path.read_text().startswith("line,label,kind,system")


def test_save_refuses_to_overwrite_a_csv_export(tmp_path):
    path = skiff().to_csv(tmp_path / "skiff.csv")
    content = path.read_bytes()
    with pytest.raises(dk.DomainError, match="refusing to overwrite"):
        skiff().save(path)
    assert path.read_bytes() == content


def test_exports_have_normal_permissions(tmp_path):
    umask = os.umask(0o022)
    try:
        for fmt, export in EXPORTS.items():
            path = tmp_path / f"x.{fmt}"
            export(skiff(), path)
            assert path.stat().st_mode & 0o777 == 0o644
    finally:
        os.umask(umask)


# ---------------------------------------------------------------------- hostile names and labels
HOSTILE = [
    "\\input{secret}",
    "\\end{document} after the end",
    "\\write18{touch pwned}",
    "line one\n\\input{secret}",
    "<script>alert('x')</script>",
    '<img src=x onerror="alert(1)">',
    "[click](javascript:alert(1))",
    "a | b ** c _d_ `e`",
    "100% $x^2$ #1 ~ {}",
]


def hostile_budget() -> Budget:
    b = Budget(name="\\input{secret}\n<script>alert('name')</script>", dry_mass=700.0)
    b.system("main", 3150.0, 900.0).system("<b>thrusters</b> \\input{secret}", 2200.0, 40.0)
    for label in HOSTILE:
        b.add(label, 10.0)
    b.add("trim", 5.0, system="<b>thrusters</b> \\input{secret}")
    b.jettison("</td><script>x</script>", 5.0)
    return b


def test_markdown_of_hostile_labels_renders_as_text():
    markdown_it = pytest.importorskip("markdown_it")
    b = hostile_budget()
    for text in (b.to_markdown(), b._repr_markdown_()):
        rendered = markdown_it.MarkdownIt("commonmark").enable("table").render(text)
        for tag in ("<script", "<img", "<b>", "</td><script", 'href="javascript'):
            assert tag not in rendered, tag
        assert "&lt;script&gt;alert(" in rendered  # shown as typed
        for table in rendered.split("<table>")[1:]:
            rows = table.split("</table>")[0].split("<tr>")[1:]
            cells = {row.count("<td") + row.count("<th") for row in rows}
            assert len(cells) == 1, "a label split a table cell"


@pytest.mark.skipif(shutil.which("pdflatex") is None, reason="pdflatex not installed")
def test_latex_of_hostile_labels_runs_nothing(tmp_path, artifacts):
    (tmp_path / "secret.tex").write_text("SECRETMARKER")
    body = hostile_budget().to_latex()
    document = (
        "\\documentclass{article}\n\\usepackage[margin=1cm,landscape]{geometry}\n\\begin{document}\n"
        "\\scriptsize\n" + body + "\nLASTWORDS\n\\end{document}\n"
    )
    (tmp_path / "hostile.tex").write_text(document)
    run = subprocess.run(
        ["pdflatex", "-shell-escape", "-interaction=nonstopmode", "-halt-on-error", "hostile.tex"],
        cwd=tmp_path,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert run.returncode == 0, run.stdout[-3000:]
    assert not (tmp_path / "pwned").exists(), "\\write18 ran"
    text = subprocess.run(
        ["pdftotext", "-layout", "hostile.pdf", "-"], cwd=tmp_path, capture_output=True, text=True
    ).stdout
    assert "SECRETMARKER" not in text, "\\input was run"
    assert "LASTWORDS" in text, "\\end{document} in a label ended the document"
    assert "input{secret}" in text and "write18" in text  # the labels are shown as typed
    shutil.copy(tmp_path / "hostile.pdf", artifacts / "budget_hostile_labels.pdf")
