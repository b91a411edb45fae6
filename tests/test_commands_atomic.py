"""Atomic writes: complete file or nothing; no overwrite without force."""

from __future__ import annotations

import pytest

from errdist.workbook.atomic import atomic_path, atomic_write, atomic_write_bytes, check_target


def test_writes_and_leaves_no_temp(tmp_path):
    target = tmp_path / "out.xlsx"
    atomic_write_bytes(target, b"content")
    assert target.read_bytes() == b"content"
    assert list(tmp_path.iterdir()) == [target]


def test_refuses_overwrite_without_force(tmp_path):
    target = tmp_path / "out.xlsx"
    target.write_bytes(b"old")
    with pytest.raises(FileExistsError, match=r"out.xlsx exists; use --force to overwrite"):
        atomic_write_bytes(target, b"new")
    assert target.read_bytes() == b"old"
    atomic_write_bytes(target, b"new", force=True)
    assert target.read_bytes() == b"new"
    assert list(tmp_path.iterdir()) == [target]


def test_failure_midway_leaves_nothing(tmp_path):
    target = tmp_path / "out.xlsx"

    def half_then_fail(path):
        path.write_bytes(b"partial")
        raise RuntimeError("disk on fire")

    with pytest.raises(RuntimeError, match="disk on fire"):
        atomic_write(target, half_then_fail)
    assert list(tmp_path.iterdir()) == []


def test_failure_keeps_existing_file_with_force(tmp_path):
    target = tmp_path / "out.xlsx"
    target.write_bytes(b"old")
    with pytest.raises(ValueError), atomic_path(target, force=True) as tmp:
        tmp.write_bytes(b"partial")
        raise ValueError("bad input")
    assert target.read_bytes() == b"old"
    assert list(tmp_path.iterdir()) == [target]


def test_empty_result_is_an_error(tmp_path):
    target = tmp_path / "out.xlsx"
    with pytest.raises(OSError, match="nothing was written"):
        atomic_write(target, lambda p: None)
    assert list(tmp_path.iterdir()) == []


def test_file_appearing_meanwhile_is_not_clobbered(tmp_path):
    target = tmp_path / "out.xlsx"

    def racer(path):
        path.write_bytes(b"mine")
        target.write_bytes(b"someone else's")

    with pytest.raises(FileExistsError):
        atomic_write(target, racer)
    assert target.read_bytes() == b"someone else's"
    assert list(tmp_path.iterdir()) == [target]


def test_missing_folder(tmp_path):
    with pytest.raises(FileNotFoundError, match="folder does not exist"):
        check_target(tmp_path / "nope" / "out.xlsx")
