"""The one crash-safe writer: usual permissions, short temporary names, all or nothing."""

from __future__ import annotations

import errno
import os
import stat

import pytest

from shipgui.core.io import files
from shipgui.core.io.files import (
    name_refused,
    write_bytes_atomic,
    write_files_atomic,
    write_problem,
)

posix_only = pytest.mark.skipif(os.name != "posix", reason="POSIX permissions")


def _mode(path) -> int:
    return stat.S_IMODE(os.stat(path).st_mode)


@posix_only
def test_new_file_gets_the_umask_not_0600(tmp_path):
    old = os.umask(0o022)
    try:
        write_bytes_atomic(tmp_path / "a.json", b"{}")
        os.umask(0o002)
        write_bytes_atomic(tmp_path / "b.json", b"{}")
    finally:
        os.umask(old)
    assert _mode(tmp_path / "a.json") == 0o644
    assert _mode(tmp_path / "b.json") == 0o664


@posix_only
def test_replaced_file_keeps_its_mode(tmp_path):
    path = tmp_path / "plan.pdf"
    path.write_bytes(b"old")
    os.chmod(path, 0o664)
    write_bytes_atomic(path, b"new")
    assert path.read_bytes() == b"new" and _mode(path) == 0o664
    os.chmod(path, 0o600)
    write_bytes_atomic(path, b"newer")
    assert _mode(path) == 0o600


def test_temporary_name_is_short_so_the_longest_legal_name_works(tmp_path):
    limit = os.pathconf(tmp_path, "PC_NAME_MAX") if hasattr(os, "pathconf") else 255
    name = "p" * (limit - 5) + ".json"  # exactly as long as the file system allows
    write_bytes_atomic(tmp_path / name, b"{}")
    assert (tmp_path / name).read_bytes() == b"{}"
    assert os.listdir(tmp_path) == [name]


def test_a_name_the_file_system_refuses_is_named_and_nothing_is_left(tmp_path):
    name = "p" * 300 + ".json"
    with pytest.raises(OSError) as caught:
        write_bytes_atomic(tmp_path / name, b"{}")
    assert caught.value.errno == errno.ENAMETOOLONG
    assert caught.value.filename == str(tmp_path / name)
    assert name_refused(caught.value) and "too long" in write_problem(caught.value)
    assert os.listdir(tmp_path) == []


def test_symbolic_link_is_followed_and_kept(tmp_path):
    real = tmp_path / "real.json"
    real.write_bytes(b"old")
    link = tmp_path / "link.json"
    link.symlink_to(real)
    write_bytes_atomic(link, b"new")
    assert link.is_symlink() and real.read_bytes() == b"new"


def test_several_files_all_or_nothing_when_one_folder_is_missing(tmp_path):
    kept = tmp_path / "kept.json"
    kept.write_bytes(b"old plan")
    with pytest.raises(OSError) as caught:
        write_files_atomic({kept: b"new plan", tmp_path / "new.csv": b"rows",
                            tmp_path / "missing" / "out.pdf": b"%PDF"})
    assert caught.value.filename == str(tmp_path / "missing" / "out.pdf")
    assert kept.read_bytes() == b"old plan"
    assert sorted(os.listdir(tmp_path)) == ["kept.json"]


def test_failure_while_putting_in_place_restores_what_was_replaced(tmp_path, monkeypatch):
    first, second, third = (tmp_path / n for n in ("a.json", "b.pdf", "c.csv"))
    first.write_bytes(b"old a")
    os.chmod(first, 0o640)
    real_replace = os.replace
    calls = []

    def replace(src, dst):
        calls.append(dst)
        if len(calls) == 3:  # the third rename: the disk gave up
            raise OSError(errno.ENOSPC, "No space left on device")
        return real_replace(src, dst)

    monkeypatch.setattr(files.os, "replace", replace)
    with pytest.raises(OSError) as caught:
        write_files_atomic({first: b"new a", second: b"new b", third: b"new c"})
    monkeypatch.undo()
    assert caught.value.filename == str(third)
    assert write_problem(caught.value) == "the disk is full"
    assert not name_refused(caught.value)
    assert first.read_bytes() == b"old a" and _mode(first) == 0o640
    assert sorted(os.listdir(tmp_path)) == ["a.json"]


def test_without_hard_links_the_old_bytes_are_put_back(tmp_path, monkeypatch):
    first, second = tmp_path / "a.json", tmp_path / "b.json"
    first.write_bytes(b"old a")

    def no_link(*_args):
        raise OSError(errno.EPERM, "Operation not permitted")

    real_replace = os.replace

    def replace(src, dst):
        if str(dst) == str(second):
            raise OSError(errno.EIO, "Input/output error")
        return real_replace(src, dst)

    monkeypatch.setattr(files.os, "link", no_link)
    monkeypatch.setattr(files.os, "replace", replace)
    with pytest.raises(OSError):
        write_files_atomic({first: b"new a", second: b"new b"})
    monkeypatch.undo()
    assert first.read_bytes() == b"old a"
    assert sorted(os.listdir(tmp_path)) == ["a.json"]


def test_a_folder_in_the_way_is_refused(tmp_path):
    (tmp_path / "out.json").mkdir()
    with pytest.raises(IsADirectoryError) as caught:
        write_bytes_atomic(tmp_path / "out.json", b"{}")
    assert name_refused(caught.value)
