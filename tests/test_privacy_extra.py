"""Small-group values in the per-member files and key folders that refuse new files."""

from __future__ import annotations

from pathlib import Path

import pandas as pd
import pytest

from roles.errors import InputError
from roles.io.privacy import check_key_path, hide_small_group_values


def test_small_group_values_leave_the_node_table():
    # Worked by hand: A has 6 members, B 1 and C 3; under 5, B and C become "other".
    table = pd.DataFrame({"node": list("abcdefghij"), "dept": ["A"] * 6 + ["B"] + ["C"] * 3})
    out = hide_small_group_values(table, "dept", 5)
    assert out["dept"].tolist() == ["A"] * 6 + ["other"] * 4
    assert table["dept"].tolist()[6] == "B"  # the input is not changed
    assert hide_small_group_values(table, "dept", 1) is table


def test_a_key_folder_that_refuses_files_is_caught_before_the_analysis(tmp_path):
    # /proc accepts no new files whatever the permission bits say (root included).
    with pytest.raises(InputError, match="cannot be written"):
        check_key_path(Path("/proc/k.json"), [tmp_path / "e.csv"], tmp_path / "out")
