"""Tests of the atomic output helpers: a failed command leaves nothing behind."""

from __future__ import annotations

import pytest
from PIL import Image

from inkshift.errors import InputError
from inkshift.files import output_folder, write_text_atomic


def test_failure_removes_written_files_and_created_folder(tmp_path):
    target = tmp_path / "out"
    with pytest.raises(RuntimeError):
        with output_folder(target, workers=2) as out:
            out.image("a.png", Image.new("RGB", (64, 64)), background=True)
            out.text("b.json", "{}")
            raise RuntimeError("drawing failed")
    assert not target.exists()


def test_failed_background_write_is_raised_and_cleaned(tmp_path):
    with pytest.raises((OSError, ValueError, KeyError)):
        with output_folder(tmp_path, workers=2) as out:
            out.image("good.png", Image.new("RGB", (8, 8)), background=True)
            out.image("bad.png", Image.new("RGB", (8, 8)), background=True, format="NO-SUCH-FORMAT")
    assert sorted(p.name for p in tmp_path.iterdir()) == []  # existing folder kept, files gone


def test_success_keeps_files_and_no_temporaries(tmp_path):
    with output_folder(tmp_path / "ok", workers=1) as out:
        out.image("a.png", Image.new("RGB", (8, 8)), background=True)
        out.text("b.txt", "x")
    assert sorted(p.name for p in (tmp_path / "ok").iterdir()) == ["a.png", "b.txt"]


def test_output_path_that_is_a_file_is_refused(tmp_path):
    blocker = tmp_path / "file"
    blocker.write_text("x")
    with pytest.raises(InputError, match="not a folder"):
        with output_folder(blocker):
            pass


def test_written_files_get_the_permissions_of_a_plainly_created_file(tmp_path):
    # Reference: a file made by open() in the same folder under the same umask;
    # the temporary file behind each atomic write is private until then.
    plain = tmp_path / "plain.txt"
    plain.write_text("x")
    written = write_text_atomic(tmp_path / "atomic.txt", "x")
    assert (written.stat().st_mode & 0o777) == (plain.stat().st_mode & 0o777)
