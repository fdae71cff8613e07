"""A missing or damaged weights file gives ModelFileError naming it and how to retrain."""

import shutil

import numpy as np
import pytest

from robtui.errors import ModelFileError
from robtui.evidence.model import DEFAULT_WEIGHTS, load_weights, save_weights
from robtui.evidence.ranker import load_ranker


def test_missing_weights_file(tmp_path):
    path = tmp_path / "ranker.npz"
    with pytest.raises(ModelFileError, match="ranker.npz.*missing.*train-ranker"):
        load_ranker(path)


def test_damaged_weights_file(tmp_path):
    path = tmp_path / "ranker.npz"
    path.write_bytes(DEFAULT_WEIGHTS.read_bytes()[:5000])
    with pytest.raises(ModelFileError, match="ranker.npz.*damaged.*train-ranker"):
        load_ranker(path)
    path.write_bytes(b"not a zip at all")
    with pytest.raises(ModelFileError, match="train-ranker"):
        load_ranker(path)


def test_inconsistent_weights_file(tmp_path):
    weights = load_weights()
    weights.lexical = weights.lexical[:, :10]
    path = tmp_path / "ranker.npz"
    save_weights(weights, path)
    with pytest.raises(ModelFileError, match="inconsistent.*lexical"):
        load_ranker(path)


def test_weights_of_another_format_version_are_refused_with_both_versions(tmp_path):
    import io
    import zipfile

    from robtui.evidence.model import FORMAT_VERSION

    with np.load(DEFAULT_WEIGHTS, allow_pickle=False) as npz:
        arrays = {name: npz[name] for name in npz.files}
    arrays["format_version"] = np.array([FORMAT_VERSION - 1])
    buffer = io.BytesIO()
    np.savez(buffer, **arrays)
    path = tmp_path / "old.npz"
    path.write_bytes(buffer.getvalue())
    assert zipfile.is_zipfile(path)
    with pytest.raises(ModelFileError, match=rf"format {FORMAT_VERSION - 1}, this robtui reads "
                                             rf"format {FORMAT_VERSION}.*train-ranker"):
        load_ranker(path)


def test_shipped_weights_round_trip_and_provenance(tmp_path):
    weights = load_weights()
    prov = weights.provenance
    assert "Kilicoglu" in prov["trained_on"]["citation"]
    assert "103717" in prov["trained_on"]["citation"]
    assert prov["item_mapping"]["questions"]["1.2"] == ["9", "10"]
    assert "scikit-learn" in prov["libraries"] and prov["date"]
    assert prov["cross_validation"]["method"].startswith("GroupKFold")
    path = tmp_path / "copy.npz"
    save_weights(weights, path)
    again = load_weights(path)
    np.testing.assert_array_equal(again.lexical, weights.lexical.astype(np.float32))
    assert again.word.vocabulary == weights.word.vocabulary
    assert again.keys == weights.keys


def test_weights_load_without_pickle_and_suggest_time_avoids_sklearn(tmp_path):
    import subprocess
    import sys

    code = ("import sys; from robtui.evidence.ranker import load_ranker; load_ranker(); "
            "print('sklearn' in sys.modules, 'scipy.sparse' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.split() == ["False", "False"]
    shutil.copy(DEFAULT_WEIGHTS, tmp_path / "w.npz")
    with np.load(tmp_path / "w.npz", allow_pickle=False) as npz:
        assert all(npz[name].dtype != object for name in npz.files)
