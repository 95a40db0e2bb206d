"""The Python column of docs/errors.md: one test per row id (test_<id>), asserting the
exception class and that the message names the culprit. Never a PanicException."""

import numpy as np
import pytest

import stillsky

SDOF = (
    '[[body]]\nname = "mass"\nmass_kg = 1\ncg_m = [0, 0, 1]\ninertia_kgm2 = [1, 1, 1]\ndofs = ["z"]\n'
    '[[spring]]\nname = "support"\nfrom = "ground"\nto = "{to}"\nat_m = [0, 0, 0]\ndirection = [0, 0, 1]\n{k}\n'
)
K = "stiffness_n_per_m = 4e5\nloss_factor = 0.05"
OPTICS = '[optics]\nbody = "mass"\nfocal_length_mm = 1000\npixel_um = {px}\naltitude_deg = 45\nazimuth_deg = 0\n'
PSD_HEAD = "# stillsky psd, quantity=velocity, unit=(m/s)^2/Hz\nfreq_hz,value\n"


def sdof(to="mass", k=K):
    return SDOF.format(to=to, k=k)


@pytest.fixture
def model():
    return stillsky.Model.from_toml_str(sdof(), "good.toml")


def test_file_missing(tmp_path):
    p = tmp_path / "rig.toml"
    with pytest.raises(stillsky.StillskyIOError, match="rig.toml") as e:
        stillsky.Model.from_toml(p)
    assert isinstance(e.value, OSError)


def test_file_not_utf8(tmp_path):
    p = tmp_path / "latin1.toml"
    p.write_bytes(b'title = "caf\xe9"\n')
    with pytest.raises(stillsky.StillskyIOError, match="UTF-8"):
        stillsky.Model.from_toml(p)


def test_model_syntax():
    with pytest.raises(stillsky.InvalidInputError, match=r"rig.toml at line 1"):
        stillsky.Model.from_toml_str("[[body]\nname = 1\n", "rig.toml")


def test_model_unknown_key():
    text = sdof() + "stifness = 3\n"
    with pytest.raises(stillsky.InvalidInputError, match=rf"typo.toml at line {text.count(chr(10))}.*stifness"):
        stillsky.Model.from_toml_str(text, "typo.toml")


def test_model_bad_value():
    with pytest.raises(stillsky.InvalidInputError, match=r"support.*-5"):
        stillsky.Model.from_toml_str(sdof(k="stiffness_n_per_m = -5"))


def test_model_unknown_carrier():
    with pytest.raises(stillsky.InvalidInputError, match="'mas'") as e:
        stillsky.Model.from_toml_str(sdof(to="mas"))
    assert type(e.value) is stillsky.InvalidInputError


def test_model_free_body():
    text = '[[node]]\nname = "floating"\nmass_kg = 1\nat_m = [0, 0, 0]\ndofs = ["z"]\n'
    with pytest.raises(stillsky.UnsupportedModelError, match="'floating'"):
        stillsky.Model.from_toml_str(text)


def test_model_too_large():
    # 334 free 6-DOF bodies = 2004 DOFs > MAX_DOFS = 2000.
    text = "".join(
        f'[[body]]\nname = "b{i}"\nmass_kg = 1\ncg_m = [0, 0, {i}]\ninertia_kgm2 = [1, 1, 1]\n' for i in range(334)
    )
    with pytest.raises(stillsky.InvalidInputError, match="free DOFs = 2004 exceeds the limit of 2000"):
        stillsky.Model.from_toml_str(text)


def test_grid_unsorted(model):
    with pytest.raises(stillsky.InvalidInputError, match="strictly increasing"):
        model.frf(np.array([2.0, 1.0]), "ground_z", "mass:z")


def test_grid_not_finite(model):
    with pytest.raises(stillsky.InvalidInputError, match="not finite"):
        model.frf(np.array([1.0, np.nan]), "ground_z", "mass:z")
    with pytest.raises(stillsky.InvalidInputError, match="not > 0"):
        model.frf(np.array([0.0, 1.0]), "ground_z", "mass:z")


def test_grid_empty(model):
    with pytest.raises(stillsky.InvalidInputError, match="empty"):
        model.frf(np.array([], dtype=np.float64), "ground_z", "mass:z")


def test_grid_too_long(model):
    n = (1 << 22) + 1  # MAX_GRID_LEN + 1
    with pytest.raises(stillsky.InvalidInputError, match=f"{n} exceeds the limit of {n - 1}"):
        model.frf(np.arange(1.0, n + 1.0), "ground_z", "mass:z")


def test_name_unknown(model):
    with pytest.raises(stillsky.InvalidInputError, match="unknown input 'ground_w'"):
        model.frf(np.array([1.0]), "ground_w", "mass:z")


def test_singular():
    # Undamped, k = (2π)² N/m on 1 kg: Z = k − ω²m = 0 at exactly 1 Hz.
    m = stillsky.Model.from_toml_str(sdof(k=f"stiffness_n_per_m = {(2 * np.pi) ** 2!r}"))
    with pytest.raises(stillsky.SingularSystemError, match="1 Hz"):
        m.frf(np.array([1.0]), "ground_z", "mass:z")


def test_psd_negative():
    with pytest.raises(stillsky.InvalidInputError, match="-1"):
        stillsky.Psd(np.array([1.0, 2.0]), np.array([1.0, -1.0]))


def test_psd_file(tmp_path):
    p = tmp_path / "ground.csv"
    p.write_text(PSD_HEAD + "1,2\n2,abc\n")
    with pytest.raises(stillsky.InvalidInputError, match=r"ground.csv at line 4.*abc"):
        stillsky.Psd.from_csv(p)


def test_psd_extrapolate():
    p = stillsky.Psd(np.array([1.0, 10.0]), np.array([1.0, 1.0]))
    with pytest.raises(stillsky.InvalidInputError, match="0.5"):
        p.resample(np.array([0.5, 5.0]), extrapolate="error")


def test_series_bad_cell(tmp_path):
    p = tmp_path / "rec.csv"
    p.write_text("# fs_hz=10\nz_g\n1\nx\n")
    with pytest.raises(stillsky.InvalidInputError, match=r"rec.csv at line 4, column 1"):
        stillsky.read_series(p)


def test_series_irregular(tmp_path):
    p = tmp_path / "log.csv"
    p.write_text("time_s,z_g\n0,1\n0.1,2\n0.5,3\n0.6,4\n0.7,5\n")
    with pytest.raises(stillsky.InvalidInputError, match="irregular"):
        stillsky.read_series(p)


def test_series_nan_sample():
    x = np.zeros(512)
    x[7] = np.nan
    with pytest.raises(stillsky.InvalidInputError, match="index 7"):
        stillsky.welch(x, 100.0, nperseg=64)


def test_optics_missing(model):
    with pytest.raises(stillsky.InvalidInputError, match="optics"):
        model.frf(np.array([1.0]), "ground_z", "image_x")


def test_optics_bad_value():
    with pytest.raises(stillsky.InvalidInputError, match="optics.pixel_um"):
        stillsky.Model.from_toml_str(OPTICS.format(px=0) + sdof())


def test_track_px_no_plate_scale(tmp_path):
    p = tmp_path / "track.csv"
    p.write_text("# fs_hz=100\ncentroid_px\n0.5\n-0.25\n0.125\n")
    with pytest.raises(stillsky.InvalidInputError, match="plate_scale_arcsec_per_px") as e:
        stillsky.read_series(p)
    assert "track.csv" in str(e.value)


def test_removal_band_outside():
    s = stillsky.SensorResponse.geophone(4.5, 0.7, 28.8)
    with pytest.raises(stillsky.InvalidInputError, match="band low end"):
        s.remove(np.zeros(256), 200.0, (0.5, 50.0))
    with pytest.raises(stillsky.InvalidInputError, match="band high end.*Nyquist"):
        s.remove(np.zeros(256), 200.0, (2.0, 150.0))


def test_length_mismatch():
    with pytest.raises(stillsky.InvalidInputError, match="expected 3, got 2"):
        stillsky.Psd(np.array([1.0, 2.0, 3.0]), np.ones(2))


def test_null_pointer(model):
    # Python's counterpart of a NULL array: None becomes a 0-D array and is refused by rank,
    # naming the argument.
    with pytest.raises(stillsky.InvalidInputError, match="freq_hz: must be a 1-D array, got 0-D"):
        model.frf(None, "ground_z", "mass:z")
    with pytest.raises(stillsky.InvalidInputError, match="x: must be a 1-D array"):
        stillsky.welch(None, 10.0)


def test_not_utf8_text():
    # A str with a lone surrogate cannot be UTF-8; it is refused before reaching the core.
    with pytest.raises(UnicodeEncodeError):
        stillsky.Model.from_toml_str('title = "caf\udce9"\n' + sdof())
