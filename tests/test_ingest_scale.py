"""Reading large files: the columnar reader gives exactly what the row reader gives, and a bad
row deep in a large file is named by line, column and value."""

from __future__ import annotations

import json
import random
import re
import sys
from pathlib import Path

import pytest
from conftest import edge_study, load_network

from generator.errors import DataError
from generator.ingest.csvfile import _columnar_table, _row_table

sys.path.insert(0, str(Path(__file__).parent / "fixtures"))
import ingest_cases  # noqa: E402

EDGES = "data/edges.csv"


def _findings(findings) -> list[tuple]:
    return [(f.level, f.message, f.line, f.column, f.value, f.count) for f in findings]


def _outcome(read, text: str, delimiter: str, row_labels: bool):
    try:
        table = read(text, "f.csv", delimiter, row_labels)
    except DataError as error:
        return ("error", _findings(error.findings))
    if table is None:
        return None
    return ("table", table.header, [c.tolist() for c in table.columns], table.lines.tolist(),
            table.trimmed, _findings(table.findings))


_TOKENS = ["a", "b", "7", " ", "\t", ",", ",", ";", '"', '"', "\n", "\n", "\r\n", "\r", "\u00e9",
           "e\u0301", "\x01", "{", "x y", "", "\u00a0", "\x1c", "\ufeff"]


def _free_text(rng: random.Random) -> str:
    return "".join(rng.choice(_TOKENS) for _ in range(rng.randint(1, 40)))


def _table_text(rng: random.Random, delimiter: str) -> str:
    """Rows of equal width (mostly), cells from odd pieces, sometimes quoted."""
    width = rng.randint(1, 4)
    rows = []
    for _ in range(rng.randint(1, 8)):
        cells = []
        for _ in range(width + (rng.random() < 0.05)):
            cell = "".join(rng.choice(["a", "7", " ", "\u00e9", "e\u0301", "\x02", '"', ";", "b"])
                           for _ in range(rng.randint(0, 3)))
            if rng.random() < 0.3:
                cell = '"' + cell.replace('"', '""') + '"'
            elif '"' in cell and rng.random() < 0.5:
                cell = cell.replace('"', "")
            cells.append(cell)
        rows.append(delimiter.join(cells))
        if rng.random() < 0.1:
            rows.append(rng.choice(["", " ", delimiter * width]))
    end = rng.choice(["\n", "\r\n", "\r"])
    return end.join(rows) + (end if rng.random() < 0.7 else "")


@pytest.mark.parametrize("delimiter", [",", "\t", ";"])
def test_the_columnar_reader_gives_what_the_row_reader_gives(delimiter):
    # The row reader (csv module, one record at a time, physical lines tracked) is the
    # reference: wherever the columnar reader takes a file, header, values, lines, trimmed
    # values, findings and refusals must be the same.
    rng = random.Random(len(delimiter) + ord(delimiter))
    taken = 0
    for k in range(1200):
        text = _free_text(rng) if k % 2 else _table_text(rng, delimiter)
        for row_labels in (False, True):
            fast = _outcome(_columnar_table, text, delimiter, row_labels)
            if fast is None:
                continue
            taken += 1
            assert fast == _outcome(_row_table, text, delimiter, row_labels), repr(text)
    assert taken > 700  # the columnar reader did take most of the files


def test_plain_files_hold_no_control_characters():
    rng = random.Random(5)
    for _ in range(1500):
        text = _free_text(rng)
        try:
            table = _columnar_table(text, "f.csv", ",", False)
        except DataError:
            continue
        if table is not None and table.plain:
            assert not any(re.search(r"[\x00-\x1f\x7f]", v) for c in table.columns for v in c)


@pytest.mark.parametrize("text, reason", [
    ('id,note\na,"two\nlines"\n', "a quoted value spans lines"),
    ('id,note\na,"x"y\n', "a quote the strict rules refuse"),
    ("id\na,b\n", "a row longer than the first"),
    ("id\na\x00\n", "a NUL character"),
])
def test_the_row_reader_takes_the_files_the_columnar_one_cannot(text, reason):
    assert _columnar_table(text, "f.csv", ",", False) is None, reason


def test_reading_gives_what_the_row_by_row_reader_recorded():
    # ingest_before.json was recorded by the row-by-row reader and cleaner that preceded the
    # columnar ones (see tests/fixtures/ingest_cases.py): 190 invented studies, cleaned
    # networks with their dtypes, findings and refusals. Five cases were re-recorded on purpose
    # when a network whose node list and edge list both hold errors began to list both files'
    # errors together (the node list's first, as recorded before), and the 22 warnings of ids
    # equal but for case when they began to give the line of each spelling.
    recorded = json.loads(ingest_cases.RECORDED.read_text())
    now = json.loads(json.dumps(ingest_cases.summaries()))
    assert len(now) == len(recorded) == len(ingest_cases.CASES)
    for i, (before, after) in enumerate(zip(recorded, now)):
        assert after == before, (i, ingest_cases.CASES[i])


# ---------------------------------------------------------------------------------------------
# One bad row near the end of a large file

ROWS = 200_000


def _large_edges(bad_row: str | None, at: int, *, note: bool = False) -> str:
    rng = random.Random(3)
    rows = ["source,target,w" + (",note" if note else "")]
    for i in range(ROWS):
        row = f"n{rng.randrange(20000)},n{rng.randrange(20000)},{rng.randint(1, 9)}"
        if note:
            row += ',"first\nsecond"' if i == 10 else ",ok"
        rows.append(bad_row if i == at and bad_row is not None else row)
    return "\n".join(rows) + "\n"


@pytest.mark.parametrize("bad_row, column, value, message", [
    ("n1,n2,heavy", "w", "heavy", "weight is not a number"),
    ("n1,n2,-3", "w", "-3", "weight is negative; netfolio reads weights as tie strengths or "
                            "distances, which cannot be below 0"),
    ("n1,n2,0", "w", "0", "weight is 0: as a tie strength it would become an infinite path "
                          "length; remove the row if there is no tie"),
    (",n2,4", "source", "", "a tie has an empty node id"),
    ("n1, ,4", "target", "", "a tie has an empty node id"),
    ("n1,n2,", "w", "", "weight is missing"),
    ("n1,n2,2,5", None, "n1,n2,2,5", "has 4 values where the header has 3 columns; check for a "
                                     "missing or extra separator or an unquoted value that "
                                     "holds one"),
    ("n1,n2", None, "n1,n2", "has 2 values where the header has 3 columns; check for a missing "
                             "or extra separator or an unquoted value that holds one"),
    ("n1,n2\x07,4", "target", "n2\x07", "a value holds a line break or another control "
                                         "character; ids, labels and numbers must be plain text "
                                         "on one line"),
])
def test_a_bad_row_near_the_end_of_a_large_edge_list_is_named(tmp_path, bad_row, column, value,
                                                              message):
    at = ROWS - 7  # data row at index ``at`` is line at + 2 (the header is line 1)
    root = edge_study(tmp_path, _large_edges(bad_row, at), weight="w", directed=True)
    with pytest.raises(DataError) as caught:
        load_network(root)
    (finding,) = caught.value.findings
    assert (finding.file, finding.line, finding.column, finding.value, finding.message) == (
        EDGES, at + 2, column, value, message)


def test_a_bad_row_after_a_value_spanning_lines_is_named_by_its_physical_line(tmp_path):
    # Row 10's note spans two lines, so every later row starts one line further down.
    at = ROWS - 3
    root = edge_study(tmp_path, _large_edges("n1,n2,x,ok", at, note=True), weight="w")
    with pytest.raises(DataError) as caught:
        load_network(root)
    (finding,) = caught.value.findings
    assert (finding.line, finding.column, finding.value) == (at + 3, "w", "x")


def test_a_large_edge_list_is_cleaned_as_a_row_by_row_count_says(tmp_path):
    # The expected findings are counted here in plain Python, one row at a time.
    text = _large_edges(None, 0) + "n5,n5,2\n n6,n7,1\nn7,n6,1\n"  # a loop, a padded id
    rows = [line.split(",") for line in text.splitlines()[1:]]
    pairs = [(s.strip(), t.strip(), float(w)) for s, t, w in rows]
    loops = [i + 2 for i, (s, t, _) in enumerate(pairs) if s == t]
    ties = [(s, t, w) for s, t, w in pairs if s != t]
    by_pair: dict[frozenset, list[tuple[str, str]]] = {}
    for s, t, _ in ties:
        by_pair.setdefault(frozenset((s, t)), []).append((s, t))
    both_ways = [p for p, listed in by_pair.items() if len(set(listed)) == 2]
    strength: dict[frozenset, float] = {}
    for s, t, w in ties:
        strength[frozenset((s, t))] = strength.get(frozenset((s, t)), 0.0) + w

    clean = load_network(edge_study(tmp_path, text, weight="w"))
    loop = next(f for f in clean.checks.findings if "self-loop" in f.message)
    shown = ", ".join(str(n) for n in loops[:20]) + (
        f" and {len(loops) - 20} more" if len(loops) > 20 else "")
    assert loop.message == (f"{len(loops)} self-loops removed (a tie from a node to itself) on "
                            f"lines {shown}")
    repeated = next(f for f in clean.checks.findings if "repeated ties" in f.message)
    assert repeated.count == len(ties) - len(by_pair)
    warning = next(f for f in clean.checks.findings if f.level == "warning")
    assert warning.count == len(both_ways)
    spaces = next(f for f in clean.checks.findings if "spaces" in f.message)
    assert (spaces.line, spaces.column, spaces.count) == (len(rows), "source", 1)
    got = {frozenset((s, t)): w for s, t, w in clean.edges.itertuples(index=False)}
    assert got == strength  # duplicates = "sum", either direction one tie


def test_natural_order_is_the_natural_key_sort():
    from generator.ingest.network import natural_key, natural_order

    rng = random.Random(2)
    pieces = ["a", "b", "A", "s", "0", "1", "01", "007", "10", "9", "\u0663", "\u00e9", "x y",
              "-", ".", "99999999999999999999"]
    for k in range(4000):
        if k % 2:  # the shapes the fast path takes: text, then a number of up to 18 digits
            ids = list({rng.choice(["", "p", "s", "ab", "\u00e9", "P"])
                        + rng.choice(["", "0", "1", "01", "10", "007", "\u0663",
                                      "123456789012345678"]) for _ in range(rng.randint(0, 12))}
                       - {""})
        else:
            ids = list({"".join(rng.choice(pieces) for _ in range(rng.randint(1, 4)))
                        for _ in range(rng.randint(0, 12))})
        assert natural_order(ids) == sorted(ids, key=natural_key), ids


def test_numbers_of_a_column_are_each_values_number():
    import math

    import numpy as np

    from generator.ingest.network import _number, _numbers

    rng = random.Random(9)
    pieces = ["1", "0", "7", ".", "e", "E", "+", "-", "5", ",", "_", " ", "inf", "nan", "\u0663",
              "x"]
    for decimal in (".", ","):
        for k in range(600):
            texts = ["".join(rng.choice(pieces[:9] if k % 2 else pieces)
                             for _ in range(rng.randint(0, 4))) for _ in range(rng.randint(1, 8))]
            values = np.empty(len(texts), dtype=object)
            values[:] = texts
            valid, numbers = _numbers(values, decimal)
            for text, ok, number in zip(texts, valid, numbers):
                expected = _number(text, decimal)
                assert bool(ok) == (expected is not None), text
                if expected is not None:
                    assert (math.isnan(expected) and math.isnan(number)) or (
                        number == expected and math.copysign(1, number) == math.copysign(
                            1, expected)), text
