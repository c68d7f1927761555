"""The revise panel on a scratch copy: a revision moves results as the physics says."""

import hashlib

import pytest
from series_files import SAMPLES

from kitchen.panels import revise_panel, scratch_copy
from kitchen.reduction import series_results
from kitchen.revisions import load_effective_series, read_revisions
from kitchen.workspace import what_changed


def _hashes(folder):
    return {
        p.name: hashlib.sha256(p.read_bytes()).hexdigest()
        for p in folder.iterdir()
        if p.name != "revisions.csv"
    }


@pytest.fixture()
def copy(tmp_path):
    return scratch_copy(SAMPLES / "clay_liner", tmp_path)


@pytest.fixture()
def panel(copy):
    return revise_panel(copy)


def test_opens_on_a_specimen_height_with_its_value(panel):
    assert panel.table_choice.value == "specimens"
    assert (panel.specimen.value, panel.field.value) == ("QF-01", "height")
    assert "116.27 mm" in panel.current.value  # sample_data/clay_liner/specimens.csv
    assert "No revisions yet" in panel.history.value


def test_height_revision_moves_density_and_k_as_the_physics_says(panel, copy):
    raw = _hashes(copy)
    before = series_results(load_effective_series(copy).series)
    panel.specimen.value = "QF-03"
    panel.value.value = "4.8 in"
    panel.reason.value = "re-measured after test"
    panel.record.click()
    assert panel.error.message == ""
    assert _hashes(copy) == raw  # the raw files are never written
    (revision,) = read_revisions(copy)
    assert (revision.specimen, revision.field, revision.new_value) == ("QF-03", "height", "4.8 in")
    # rho_d = Ms/(A L) and k = a L ln(h1/h2)/(A t): rho_d ~ 1/L, k ~ L (Darcy; ASTM D5084)
    row = panel.changed.iloc[0]
    ratio = 4.8 * 25.4 / 116.14  # new over old height, 116.14 mm in specimens.csv
    assert row["specimen"] == "QF-03" and len(panel.changed) == 1
    assert row["dry_density_after"] / row["dry_density_before"] == pytest.approx(1 / ratio)
    assert row["k_reference_after"] / row["k_reference_before"] == pytest.approx(ratio)
    after = series_results(load_effective_series(copy).series)
    expected = what_changed(before, after, 1e-9)
    assert panel.changed.equals(expected)
    assert "QF-03" in panel.changes.value and "in force" in panel.history.value
    shown = f"{row['dry_density_before'] / 1000:.3f} → {row['dry_density_after'] / 1000:.3f}"
    assert shown in panel.changes.value  # before and after side by side, in Mg/m3
    assert "121.92 mm" in panel.current.value


def test_withdrawing_restores_the_results(panel, copy):
    original = series_results(load_effective_series(copy).series)
    panel.value.value = "120 mm"
    panel.reason.value = "re-measured"
    panel.record.click()
    assert panel.withdraw_choice.value == panel.last.id  # the latest revision, chosen
    panel.withdraw_reason.value = "first measurement was right"
    panel.withdraw_confirm.value = True
    panel.withdraw.click()
    assert panel.error.message == "" and panel.withdraw_error.message == ""
    restored = series_results(load_effective_series(copy).series)
    assert what_changed(original, restored).empty
    assert "withdrawn by" in panel.history.value
    assert panel.withdraw_choice.options == ()


def test_a_reading_can_be_revised(panel, copy):
    panel.table_choice.value = "falling_head"
    panel.specimen.value = "QF-05"
    assert panel.field.value == "head"
    # QF-05: 41 readings (sample_data/README.md), rows 215-255 of clay_liner/falling_head.csv
    assert (panel.reading.min, panel.reading.max) == (215, 255)
    first = 255  # its last reading
    panel.reading.value = first
    assert "row 255: time" in panel.current.value
    panel.value.value = "0.5 m"  # far below the reading before: allowed, heads only fall
    panel.reason.value = "transcription error"
    panel.record.click()
    assert panel.error.message == ""
    (revision,) = read_revisions(copy)
    assert (revision.table, revision.reading_row, revision.field) == ("falling_head", first, "head")
    assert list(panel.changed["specimen"]) == ["QF-05"]


@pytest.mark.parametrize(
    ("value", "reason", "message"),
    [("5 g", "re-measured", "is not a length"), ("120 mm", "", "needs a reason")],
)
def test_refused_revisions_write_nothing_and_say_why(panel, copy, value, reason, message):
    panel.value.value = value
    panel.reason.value = reason
    panel.record.click()
    assert message in panel.error.message
    assert not (copy / "revisions.csv").exists() or read_revisions(copy) == ()


def test_current_value_is_shown_in_the_unit_of_the_file(panel):
    # sample_data/clay_liner/specimens.csv: QF-11 gives its dry soil as mold masses
    panel.specimen.value = "QF-11"
    panel.field.value = "water_content"
    assert "18.7 %" in panel.current.value
    panel.field.value = "dry_mass"
    assert "from the mold masses" in panel.current.value
    panel.field.value = "d10"
    assert "not a column of the file" in panel.current.value


def test_only_the_revised_specimen_is_reduced_again(panel):
    panel.specimen.value = "QF-07"
    panel.value.value = "117.0 mm"
    panel.reason.value = "re-measured"
    panel.record.click()
    assert panel.workspace.last_moved == ("QF-07",)
    assert "Reduced again: QF-07" in panel.changes.value


def test_the_charts_follow_a_revision(panel, copy):
    # the panel's charts, redrawn by sending only what changed, are the charts built afresh
    # from the effective data (and the specimen's k in its chart title moves with L)
    import json

    import plotly.graph_objects as go
    from plotly.io.json import to_json_plotly

    from kitchen import charts
    from kitchen.analysis import analyse_series

    def traces(figure):
        data = [trace.to_plotly_json() for trace in figure.data]
        for trace in data:
            trace.pop("uid", None)
        return json.loads(to_json_plotly(data))

    panel.specimen.value = "QF-06"
    title = panel.specimen_chart.layout.title.text
    panel.value.value = "118.5 mm"
    panel.reason.value = "re-measured after test"
    panel.record.click()
    assert panel.error.message == ""
    series = load_effective_series(copy).series
    analysis = analyse_series(series_results(series), 1e-9)
    fresh = go.Figure(charts.compaction_conductivity_spec(analysis))
    assert traces(panel.series_chart) == traces(fresh)
    assert panel.specimen_chart.layout.title.text != title
    assert "Specimen QF-06" in panel.specimen_chart.layout.title.text


def test_the_criterion_box_opens_on_the_series_own_or_empty(panel, tmp_path):
    # the clay liner's project table says 1e-9 m/s; without it, no verdict is shown
    assert panel.criterion.value == "1e-9 m/s"
    bare = scratch_copy(SAMPLES / "clay_liner", tmp_path / "bare")
    (bare / "project.csv").unlink()
    empty = revise_panel(bare)
    assert empty.criterion.value == "" and "none given" in empty.criterion.placeholder
    empty.specimen.value = "QF-03"
    empty.value.value = "4.8 in"
    empty.reason.value = "re-measured after test"
    empty.record.click()
    assert empty.error.message == ""
    assert empty.changed[["verdict_before", "verdict_after"]].isna().all(axis=None)
    empty.criterion.value = "1e-10 m/s"  # typed: the next summary judges against it
    empty.value.value = "4.7 in"
    empty.reason.value = "re-measured again"
    empty.record.click()
    # QF-03's true k20 is 6.39e-10 m/s (sample_data/README.md): above 1e-10 m/s
    assert empty.changed.loc[0, "verdict_after"] == "does not meet"


def _record(panel, value="120 mm", reason="re-measured"):
    panel.value.value = value
    panel.reason.value = reason
    panel.record.click()
    assert panel.error.message == ""
    return panel.last


def test_the_reason_box_starts_empty_after_each_revision(panel):
    _record(panel)
    assert panel.reason.value == "" and panel.value.value == ""
    panel.value.value = "121 mm"
    panel.record.click()  # no reason carried over from the revision before
    assert "needs a reason" in panel.error.message


def test_a_withdrawal_has_its_own_reason_and_is_confirmed(panel, copy):
    revision = _record(panel, reason="re-measured after test")
    assert panel.withdraw_reason.value == ""
    assert panel.withdraw_confirm.description == f"I withdraw revision {revision.id}"
    assert panel.withdraw_confirm.value is False
    panel.withdraw.click()  # one click: no reason, no confirmation
    assert "a withdrawal needs a reason" in panel.withdraw_error.message
    assert revision.id in panel.withdraw_error.message
    assert panel.error.message == ""  # said beside the withdraw button, not beside Record
    panel.withdraw_reason.value = "the first measurement was right"
    panel.withdraw.click()
    assert f"tick 'I withdraw revision {revision.id}' to confirm" in panel.withdraw_error.message
    assert len(read_revisions(copy)) == 1  # nothing written by either refusal
    panel.withdraw_confirm.value = True
    panel.withdraw.click()
    assert panel.withdraw_error.message == ""
    first, withdrawal = read_revisions(copy)
    assert withdrawal.reason == "the first measurement was right"
    assert first.reason == "re-measured after test"
    assert panel.withdraw_reason.value == "" and panel.withdraw_confirm.value is False


def test_choosing_another_revision_unticks_the_confirmation(panel):
    first = _record(panel, "120 mm", "re-measured")
    panel.specimen.value = "QF-02"
    second = _record(panel, "119 mm", "re-measured too")
    assert panel.withdraw_choice.value == second.id
    panel.withdraw_confirm.value = True
    panel.withdraw_choice.value = first.id
    assert panel.withdraw_confirm.value is False
    assert panel.withdraw_confirm.description == f"I withdraw revision {first.id}"


def test_a_refused_revision_is_said_beside_its_button_in_its_own_words(panel):
    panel.value.value = "5 g"
    panel.reason.value = "re-measured"
    panel.record.click()
    assert "Could not finish recording the revision" in panel.error.widget.value
    assert "nothing was written" in panel.error.widget.value
    assert "Correct the files" not in panel.error.widget.value
    assert panel.withdraw_error.message == ""
