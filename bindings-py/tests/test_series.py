"""read_series against independent readers: ObsPy (libmseed) on ObsPy's own bundled example
recordings (real seismometer data), scipy.io.wavfile and the stdlib wave module for WAV."""

import pathlib
import wave

import numpy as np
import pytest
import scipy.io.wavfile

import stillsky

obspy = pytest.importorskip("obspy")
OBSPY_MSEED = pathlib.Path(obspy.__file__).parent / "io" / "mseed" / "tests" / "data"
OBSPY_WAV = pathlib.Path(obspy.__file__).parent / "io" / "wav" / "tests" / "data"
ROOT = pathlib.Path(__file__).resolve().parents[2]

# Single-channel example recordings shipped with ObsPy (Steim-1 / Steim-2 records of real
# stations).
MSEED_FILES = ["BW.BGLD.__.EHE.D.2008.001.first_10_records", "steim2.mseed", "BW.UH3.__.EHZ.D.2010.171.first_record"]


@pytest.mark.parametrize("name", MSEED_FILES)
def test_mseed_equals_obspy_bit_for_bit(name):
    path = OBSPY_MSEED / name
    tr = obspy.read(str(path))[0]
    s = stillsky.read_series(path)
    assert s.unit == "counts" and s.axes == [tr.id]
    assert s.fs == tr.stats.sampling_rate
    assert s.samples.shape == (tr.stats.npts, 1)
    np.testing.assert_array_equal(s.samples[:, 0], tr.data.astype(np.float64))
    assert s.timing["n_gaps"] == 0


def test_mseed_sensitivity_gives_si_units():
    path = OBSPY_MSEED / MSEED_FILES[0]
    tr = obspy.read(str(path))[0]
    s = stillsky.read_series(path, sensitivity=(1500.0, "mm_s"))
    assert s.unit == "m/s"
    np.testing.assert_allclose(s.samples[:, 0], tr.data / 1500.0 * 1e-3, rtol=1e-15)


@pytest.mark.parametrize("name", sorted(p.name for p in OBSPY_WAV.glob("*.wav")))
def test_wav_equals_scipy_wavfile(name):
    path = OBSPY_WAV / name
    fs, data = scipy.io.wavfile.read(path)
    data = data.reshape(len(data), -1)
    # PCM full scale (WAV format): signed n-bit samples / 2^(n−1); 8-bit is unsigned, offset 128.
    if data.dtype == np.uint8:
        ref = (data.astype(np.float64) - 128.0) / 128.0
    else:
        ref = data.astype(np.float64) / 2.0 ** (8 * data.dtype.itemsize - 1)
    s = stillsky.read_series(path, wav_full_scale=(2.0, "g"))
    assert s.fs == fs and s.unit == "m/s^2"
    # Full scale 2 g with standard gravity 9.80665 m/s² (CGPM 1901).
    np.testing.assert_allclose(s.samples, ref * 2.0 * 9.80665, rtol=1e-15, atol=0)


def test_wav_stdlib_written_three_axes(tmp_path):
    rng = np.random.default_rng(7)
    x = rng.integers(-32768, 32767, size=(500, 3), dtype=np.int16)
    p = tmp_path / "three.wav"
    with wave.open(str(p), "wb") as w:
        w.setnchannels(3)
        w.setsampwidth(2)
        w.setframerate(250)
        w.writeframes(x.tobytes())
    s = stillsky.read_series(p, wav_full_scale=(1.0, "m_s2"))
    assert s.samples.shape == (500, 3) and s.fs == 250.0
    np.testing.assert_array_equal(s.samples, x / 32768.0)


def test_timestamped_text_reports_rate_jitter_and_gap(tmp_path):
    # Irregular timestamps as a phone logger writes them: 100 Hz nominal with 1 % jitter.
    rng = np.random.default_rng(3)
    t = np.arange(2000) * 0.01 + rng.uniform(-1e-4, 1e-4, 2000)
    a = rng.normal(size=2000)
    p = tmp_path / "phone.csv"
    np.savetxt(p, np.column_stack([t, a]), delimiter=",", header="time_s,z_m_s2", comments="")
    s = stillsky.read_series(p)
    dt = np.diff(t)
    assert s.timing["source"] == "time column" and s.timing["resampled"]
    assert s.timing["fs_hz_mean"] == pytest.approx((len(t) - 1) / (t[-1] - t[0]), rel=1e-9)
    assert s.timing["jitter_std_s"] == pytest.approx(dt.std(), rel=0.05)
    # A 0.5 s hole in the log is a gap (an interval > 1.5 × median): too irregular to resample,
    # so the reader refuses and names the rate, the jitter and the gap.
    keep = np.r_[0:1000, 1050:2000]
    p2 = tmp_path / "gap.csv"
    np.savetxt(p2, np.column_stack([t[keep], a[keep]]), delimiter=",", header="time_s,z_m_s2", comments="")
    with pytest.raises(stillsky.InvalidInputError, match=r"mean rate 97\.\d+ Hz.*1 gap.*gap at t = 9\.99"):
        stillsky.read_series(p2)


def test_demo_recording_reads_and_bad_unit_is_named():
    rec = sorted((ROOT / "docs" / "examples" / "recordings").glob("*.csv"))[0]
    s = stillsky.read_series(rec)
    assert s.samples.ndim == 2 and s.samples.shape[1] == len(s.axes) and s.fs > 0
    with pytest.raises(stillsky.InvalidInputError, match="unit"):
        stillsky.read_series(rec, unit="furlongs")
    with pytest.raises(stillsky.StillskyIOError):
        stillsky.read_series(ROOT / "no-such-recording.csv")
