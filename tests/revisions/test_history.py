"""The history of the revisions in words, and what a revision changed in the results."""

import numpy as np
import pandas as pd
import pytest
from revision_series import small_series
from series_files import SAMPLES, copy_sample

from kitchen.revisions import RevisionError, format_history, read_revisions, revise
from kitchen.workspace import revision_effect, what_changed


@pytest.fixture
def small(tmp_path):
    return small_series(tmp_path / "small")


@pytest.fixture
def clay(tmp_path):
    return copy_sample(SAMPLES / "clay_liner", tmp_path / "clay_liner")


# --- what changed ------------------------------------------------------------------------------


def _results(k_values, density=(1700.0, 1710.0, 1720.0), valid=(True, True, False)):
    k = np.array(k_values, dtype=float)
    return pd.DataFrame(
        {
            "specimen": ["S1", "S2", "S3"],
            "method": ["falling_head"] * 3,
            "dry_density": density,
            "void_ratio": [0.59, 0.58, 0.57],
            "k_reference": k,
            "k_reference_low": k * 0.8,
            "k_reference_high": k * 1.2,
            "valid": valid,
        }
    )


def test_what_changed_lists_only_what_moved():
    before = _results([5e-10, 2e-9, np.nan])
    after = _results([5e-10, 8e-10, np.nan], density=(1700.0, 1650.0, 1720.0))
    moved = what_changed(before, after, criterion=1e-9)
    assert moved["specimen"].tolist() == ["S2"]
    row = moved.iloc[0]
    assert row["moved"] == "dry_density, k_reference, verdict"
    assert (row["dry_density_before"], row["dry_density_after"]) == (1710.0, 1650.0)
    # meets when k_high <= criterion (kitchen.analysis.criterion.classify_against_criterion)
    assert (row["verdict_before"], row["verdict_after"]) == ("does not meet", "meets")
    same = what_changed(before, before, criterion=1e-9)
    assert same.empty and list(same.columns) == list(moved.columns)


def test_what_changed_without_a_criterion_and_with_missing_k():
    before = _results([5e-10, 2e-9, np.nan])
    after = _results([5e-10, 2e-9, 3e-9], valid=(True, True, True))
    moved = what_changed(before, after)
    assert moved["specimen"].tolist() == ["S3"]
    assert moved.loc[0, "moved"] == "k_reference, valid"
    assert moved[["verdict_before", "verdict_after"]].isna().all(axis=None)
    judged = what_changed(before, after, criterion=1e-9)
    assert (judged.loc[0, "verdict_before"], judged.loc[0, "verdict_after"]) == (
        "no result",
        "does not meet",
    )


def test_what_changed_gives_a_test_not_valid_no_verdict_unless_kept():
    # the verdicts of the revise summary follow the series analysis: validity comes first
    before = _results([5e-10, 2e-9, 3e-9], valid=(True, True, True))
    after = _results([5e-10, 2e-9, 3e-9], valid=(False, True, True))
    moved = what_changed(before, after, criterion=1e-9)
    assert (moved.loc[0, "verdict_before"], moved.loc[0, "verdict_after"]) == (
        "meets",
        "not judged (test not valid)",
    )
    kept = what_changed(before, after, criterion=1e-9, kept={("S1", "falling_head")})
    assert kept.loc[0, "moved"] == "valid" and kept.loc[0, "verdict_after"] == "meets"


def test_what_changed_names_missing_columns():
    with pytest.raises(ValueError, match="after: results table lacks the columns valid"):
        what_changed(_results([1e-9] * 3), _results([1e-9] * 3).drop(columns="valid"))


def test_revision_effect_judges_against_the_series_criterion_unless_one_is_given(clay):
    # QF-05 (true k20 1.25e-10 m/s, sample_data/README.md) meets the clay liner's 1e-9 m/s
    # of its project table, and does not meet 1e-11 m/s given instead
    made = revise(clay, specimen="QF-05", field="height", value="120 mm", reason="swelled")
    own = revision_effect(clay, made.id)
    assert (own.loc[0, "verdict_before"], own.loc[0, "verdict_after"]) == ("meets", "meets")
    given = revision_effect(clay, made.id, criterion=1e-11)
    assert given.loc[0, "verdict_after"] == "does not meet"
    (clay / "project.csv").unlink()  # none given anywhere: no verdict
    assert revision_effect(clay, made.id)[["verdict_before", "verdict_after"]].isna().all(axis=None)


def test_revision_effect_compares_across_one_row(clay):
    from kitchen.revisions import withdraw

    made = revise(clay, specimen="QF-05", field="height", value="120 mm", reason="swelled")
    effect = revision_effect(clay, made.id, criterion=1e-9)
    assert effect["specimen"].tolist() == ["QF-05"]
    assert effect.loc[0, "dry_density_after"] < effect.loc[0, "dry_density_before"]
    undone = withdraw(clay, made.id, reason="no")
    back = revision_effect(clay, undone.id)
    assert back.loc[0, "k_reference_after"] == effect.loc[0, "k_reference_before"]
    with pytest.raises(RevisionError, match="no revision 'cafef00d'"):
        revision_effect(clay, "cafef00d")


def test_history_reads_in_words(small):
    revise(small, specimen="A1", field="height", value="4.6 in", reason="re-measured", who="J")
    text = format_history(read_revisions(small))
    assert "specimens A1 height: 116.4 mm -> 116.84 mm (typed 4.6 in)" in text
    assert "in force" in text and "re-measured" in text
    assert format_history(()) == "no revisions"
