"""The decision sheet round trip: export a queue, fill `decision`, import; bad rows by line; nothing twice."""

import csv

import pytest

from pipeline.errors import BadInput
from pipeline.review.bulk import SHEET_COLUMNS, import_sheet, write_sheet
from pipeline.review.queues import review_queue
from pipeline.store import open_store
from review_graphs import build, edges_of


@pytest.fixture
def store(tmp_path):
    with open_store(build(tmp_path)) as s:
        yield s


def read(path):
    with open(path, newline="", encoding="utf-8") as fh:
        return list(csv.DictReader(fh))


def write(path, rows):
    with open(path, "w", newline="", encoding="utf-8") as fh:
        w = csv.DictWriter(fh, fieldnames=SHEET_COLUMNS)
        w.writeheader()
        w.writerows(rows)


def test_export_has_one_row_per_candidate(store, tmp_path):
    out = tmp_path / "uncertain.csv"
    info = write_sheet(review_queue(store, "uncertain"), out, batch="b1")
    rows = read(out)
    assert info == {"file": str(out), "rows": 4, "categories": 2}
    assert [(r["category_code"], r["rank"], r["concept_code"], r["decision"]) for r in rows] == [
        ("3", "1", "LM", ""), ("3", "2", "GT", ""), ("5", "1", "PA", ""), ("5", "2", "KC", "")]
    assert rows[0]["batch"] == "b1" and rows[0]["titles"] == "Push mower | Reel mower | Mower blade"


def test_round_trip_applies_filled_rows_and_reports_bad_ones_by_line(store, tmp_path):
    out = tmp_path / "sheet.csv"
    write_sheet(review_queue(store, "uncertain") + review_queue(store, "unmapped"), out, batch="b2")
    rows = read(out)
    rows[0]["decision"] = "accept"                      # line 2: shop:3 -> LM
    rows[3]["decision"] = "Reject"                      # line 5: shop:5 -> KC (case does not matter)
    rows[2]["decision"] = "perhaps"                     # line 4: not a decision
    rows[4].update(decision="remap", concept_code="NOPE")  # line 6: shop:6 -> unknown concept
    write(out, rows)
    summary = import_sheet(store, out, by="ana")
    assert summary["applied"] == 2
    assert [(r["line"], r["field"]) for r in summary["invalid_rows"]] == [(4, "decision"), (6, None)]
    assert "NOPE" in summary["invalid"][1] and summary["invalid"][1].startswith(f"{out}:6")
    assert edges_of(store, "shop:3") == {"LM": "accepted"}
    assert edges_of(store, "shop:5") == {"PA": "auto", "KC": "rejected"}

    # fix the two bad rows and import the same sheet again: only they are applied
    rows[2]["decision"] = ""
    rows[4]["concept_code"] = "Garden"
    write(out, rows)
    again = import_sheet(store, out, by="ana")
    assert (again["applied"], again["skipped_already_applied"], again["invalid"]) == (1, 2, [])
    assert edges_of(store, "shop:6") == {"G": "accepted"}
    third = import_sheet(store, out, by="ana")
    assert (third["applied"], third["skipped_already_applied"]) == (0, 3)


def test_a_sheet_without_the_decision_column_is_refused(store, tmp_path):
    bad = tmp_path / "bad.csv"
    bad.write_text("source,category_code,concept_code\nshop,3,LM\n")
    with pytest.raises(BadInput, match="missing column"):
        import_sheet(store, bad)


def test_a_spreadsheet_byte_order_mark_is_fine(store, tmp_path):
    sheet = tmp_path / "bom.csv"
    sheet.write_bytes("\ufeffsource,category_code,concept_code,decision\nshop,3,LM,accept\n".encode())
    assert import_sheet(store, sheet)["applied"] == 1
