"""Every exception class raised by a bad input, message checked; never a PanicException."""

import pickle

import numpy as np
import pytest

import stillsky
from conftest import sdof_toml

GOOD = sdof_toml(loss=0.05)


@pytest.fixture
def model():
    return stillsky.Model.from_toml_str(GOOD, "good.toml")


def test_hierarchy():
    assert issubclass(stillsky.InvalidInputError, stillsky.StillskyError)
    assert issubclass(stillsky.InvalidInputError, ValueError)
    for cls in (stillsky.UnsupportedModelError, stillsky.SingularSystemError, stillsky.NotPositiveDefiniteError):
        assert issubclass(cls, stillsky.InvalidInputError)
    assert issubclass(stillsky.StillskyIOError, OSError) and issubclass(stillsky.StillskyIOError, stillsky.StillskyError)
    assert issubclass(stillsky.ConvergenceError, RuntimeError)
    assert not issubclass(stillsky.StillskyIOError, ValueError)
    for cls in (stillsky.StillskyError, stillsky.InvalidInputError, stillsky.StillskyIOError):
        e = pickle.loads(pickle.dumps(cls("msg")))
        assert type(e) is cls and str(e) == "msg"
        assert cls.__module__ == "stillsky._native"


def test_unknown_key_names_key_file_and_line():
    text = GOOD + "stifness = 3\n"
    line = text.count("\n")
    with pytest.raises(stillsky.InvalidInputError) as e:
        stillsky.Model.from_toml_str(text, "typo.toml")
    msg = str(e.value)
    assert "stifness" in msg and "typo.toml" in msg and f"line {line}" in msg, msg


def test_negative_stiffness_names_field():
    with pytest.raises(stillsky.InvalidInputError, match=r"spring 'support'\.stiffness"):
        stillsky.Model.from_toml_str(sdof_toml(k=-5.0))


def test_free_body_is_unsupported_and_named():
    text = '[[node]]\nname = "floating"\nmass_kg = 1.0\nat_m = [0, 0, 0]\ndofs = ["z"]\n'
    with pytest.raises(stillsky.UnsupportedModelError, match="'floating'"):
        stillsky.Model.from_toml_str(text)


def test_singular_system_at_exact_resonance():
    # Undamped SDOF with k = (2π)² N/m and m = 1 kg evaluated at exactly 1 Hz: Z = 0.
    m = stillsky.Model.from_toml_str(sdof_toml(m=1.0, k=(2 * np.pi) ** 2))
    with pytest.raises(stillsky.SingularSystemError, match="1 Hz"):
        m.frf(np.array([1.0]), "ground_z", "mass:z")


@pytest.mark.parametrize(
    "freq,needle",
    [
        (np.array([2.0, 1.0]), "strictly increasing"),
        (np.array([1.0, np.nan]), "not finite"),
        (np.array([0.0, 1.0]), "not > 0"),
        (np.array([]), "empty"),
        (np.ones((2, 3)), r"1-D array, got 2-D with shape \(2, 3\)"),
        (np.float64(3.0), "1-D array, got 0-D"),
    ],
)
def test_bad_grids(model, freq, needle):
    with pytest.raises(stillsky.InvalidInputError, match=needle):
        model.frf(freq, "ground_z", "mass:z")


def test_names(model):
    with pytest.raises(stillsky.InvalidInputError, match="unknown input 'ground_w'"):
        model.frf(np.array([1.0]), "ground_w", "mass:z")
    with pytest.raises(stillsky.InvalidInputError, match="mass:x"):
        model.frf(np.array([1.0]), "ground_z", "mass:x")
    with pytest.raises(stillsky.InvalidInputError, match="input"):
        model.input_vector("nothing")
    with pytest.raises(TypeError, match="str or a sequence of str"):
        model.frf(np.array([1.0]), 3, "mass:z")


def test_dtypes(model):
    with pytest.raises(TypeError, match="float64.*int64"):
        model.frf(np.arange(1, 4), "ground_z", "mass:z")
    with pytest.raises(TypeError, match="float32"):
        stillsky.welch(np.zeros(512, dtype=np.float32), 100.0)


def test_missing_file_is_oserror(tmp_path):
    p = tmp_path / "absent.toml"
    with pytest.raises(stillsky.StillskyIOError) as e:
        stillsky.Model.from_toml(p)
    assert isinstance(e.value, OSError) and str(p) in str(e.value)
    with pytest.raises(OSError):
        stillsky.Psd.from_csv(tmp_path / "absent.csv")


def test_matrices_bad_frequency(model):
    with pytest.raises(stillsky.InvalidInputError, match="freq_hz"):
        model.matrices(float("nan"))
    # The core names this argument f_hz (Model::input_vector).
    with pytest.raises(stillsky.InvalidInputError, match="f_hz.*-1"):
        model.input_vector("ground_z", -1.0)


def test_welch_bad_arguments():
    x = np.random.default_rng(0).normal(size=300)
    with pytest.raises(stillsky.InvalidInputError, match="nperseg"):
        stillsky.welch(x, 10.0, nperseg=512)
    with pytest.raises(stillsky.InvalidInputError, match="noverlap"):
        stillsky.welch(x, 10.0, nperseg=64, noverlap=64)
    with pytest.raises(stillsky.InvalidInputError, match="window"):
        stillsky.welch(x, 10.0, nperseg=64, window="kaiserish")
    with pytest.raises(stillsky.InvalidInputError, match="fs"):
        stillsky.welch(x, -1.0, nperseg=64)
    x[5] = np.nan
    with pytest.raises(stillsky.InvalidInputError, match="index 5"):
        stillsky.welch(x, 10.0, nperseg=64)
    with pytest.raises(stillsky.InvalidInputError, match="1-D"):
        stillsky.welch(np.zeros((2, 300)), 10.0, nperseg=64)
    with pytest.raises(stillsky.InvalidInputError):
        stillsky.welch(np.array([]), 10.0, nperseg=64)


def test_psd_bad_values():
    f = np.array([1.0, 2.0, 3.0])
    with pytest.raises(stillsky.InvalidInputError):
        stillsky.Psd(f, np.array([1.0, -1.0, 1.0]))
    with pytest.raises(stillsky.InvalidInputError, match="quantity"):
        stillsky.Psd(f, np.ones(3), "loudness")
    with pytest.raises(stillsky.InvalidInputError):
        stillsky.Psd(f, np.ones(2))
