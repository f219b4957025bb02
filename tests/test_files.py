"""deltakit._files: whole or nothing, links kept, strangers never overwritten."""

from __future__ import annotations

import os
import stat
import subprocess
import sys
import time

import pytest

from deltakit import DomainError
from deltakit._files import file_lock, remove_orphans, write_atomic


def _ours(head: bytes) -> bool:
    return head.startswith(b"ours")


def test_write_replaces_a_file_of_the_same_kind_and_refuses_a_stranger(tmp_path):
    path = tmp_path / "out.txt"
    write_atomic(path, "ours 1", kind="note", same_kind=_ours)
    write_atomic(path, "ours 2", kind="note", same_kind=_ours)
    assert path.read_text() == "ours 2"
    stranger = tmp_path / "thesis.tex"
    stranger.write_text("three years of work")
    with pytest.raises(DomainError, match=r"refusing to overwrite .*thesis.tex.*overwrite=True"):
        write_atomic(stranger, "ours", kind="note", same_kind=_ours)
    assert stranger.read_text() == "three years of work"
    write_atomic(stranger, "ours", kind="note", same_kind=_ours, overwrite=True)
    assert stranger.read_text() == "ours"


def test_a_symlink_is_followed_and_kept(tmp_path):
    real = tmp_path / "real.txt"
    real.write_text("ours 0")
    link = tmp_path / "link.txt"
    link.symlink_to(real)
    write_atomic(link, "ours 1", kind="note", same_kind=_ours)
    assert link.is_symlink() and real.read_text() == "ours 1"


def test_new_files_get_normal_permissions_and_old_ones_keep_theirs(tmp_path):
    old_umask = os.umask(0o022)
    try:
        path = tmp_path / "new.txt"
        write_atomic(path, "ours", kind="note")
        assert stat.S_IMODE(path.stat().st_mode) == 0o644
        os.chmod(path, 0o640)
        write_atomic(path, "ours again", kind="note", same_kind=_ours)
        assert stat.S_IMODE(path.stat().st_mode) == 0o640
    finally:
        os.umask(old_umask)


def test_a_folder_is_refused(tmp_path):
    with pytest.raises(DomainError, match="it is a folder"):
        write_atomic(tmp_path, "x", kind="note")


def test_orphans_of_dead_saves_are_removed_and_live_ones_kept(tmp_path):
    path = tmp_path / "budget.json"
    dead = subprocess.run(
        [sys.executable, "-c", "import os; print(os.getpid())"], capture_output=True, text=True
    )
    dead_pid = int(dead.stdout)
    orphan = tmp_path / f".budget.json.{dead_pid}.abcd1234.deltakit-tmp"
    live = tmp_path / f".budget.json.{os.getpid()}.abcd1234.deltakit-tmp"
    unrelated = tmp_path / ".other.json.1.abcd.deltakit-tmp"
    for p in (orphan, live, unrelated):
        p.write_text("partial")
    assert remove_orphans(path) == 1
    assert not orphan.exists() and live.exists() and unrelated.exists()


def test_a_kill_during_a_save_leaves_the_old_file_whole(tmp_path):
    # A child process saves a large file over and over; it is killed with
    # SIGKILL while a temporary file is being written. The target then holds
    # a whole file (old or new), and the next save's clean-up removes the orphan.
    path = tmp_path / "data.txt"
    path.write_text("ours old")
    new = "ours " + "x" * 50_000_000
    code = (
        "import sys; from deltakit._files import write_atomic\n"
        "text = 'ours ' + 'x' * 50_000_000\n"
        "while True:\n"
        "    write_atomic(sys.argv[1], text, kind='note', same_kind=lambda h: True)\n"
    )
    child = subprocess.Popen([sys.executable, "-c", code, str(path)])
    try:
        deadline = time.monotonic() + 60
        while not any(p.name.endswith(".deltakit-tmp") for p in tmp_path.iterdir()):
            assert time.monotonic() < deadline, "the child never started a save"
            time.sleep(0.001)
    finally:
        child.kill()
        child.wait()
    assert path.read_text() in ("ours old", new)
    write_atomic(path, "ours final", kind="note", same_kind=_ours)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["data.txt"]
    assert path.read_text() == "ours final"


def test_the_lock_refuses_a_second_writer_when_asked_not_to_wait(tmp_path):
    path = tmp_path / "sweep.zarr"
    code = (
        "import sys, time; from deltakit._files import file_lock\n"
        "with file_lock(sys.argv[1]):\n"
        "    print('held', flush=True); time.sleep(30)\n"
    )
    child = subprocess.Popen([sys.executable, "-c", code, str(path)], stdout=subprocess.PIPE, text=True)
    try:
        assert child.stdout.readline().strip() == "held"
        with pytest.raises(DomainError, match="being written by another process"):
            with file_lock(path, wait=False):
                pass
    finally:
        child.kill()
        child.wait()
    with file_lock(path, wait=False):
        pass
