"""The streaming monitor from Python: the readings are the core's, checked against an independent
computation (scipy.signal.lfilter on the monitor's own FIR taps, numpy running sums and a Python
re-statement of the flag rules), the filter design against scipy's analog Butterworth, the
windowed RMS against the offline PSD estimate, and bad input against the named exceptions."""

import math
import pathlib

import numpy as np
import pytest
import scipy.signal

import stillsky

ARCSEC_PER_RAD = 180.0 * 3600.0 / math.pi

# A 20 kg tube on horizontal springs at two heights (tests/data/monitor-rig.toml, the rig of the
# C monitor tests too; invented test numbers).
RIG = (pathlib.Path(__file__).resolve().parents[2] / "tests" / "data" / "monitor-rig.toml").read_text()


@pytest.fixture(scope="module")
def rig():
    return stillsky.Model.from_toml_str(RIG, "rig")


def flat(c, fs=200.0, **kw):
    """One channel, a flat calibration of c rad per m/s² on image_x, nothing on image_y."""
    frf = np.zeros((2, 2, 1), dtype=complex)
    frf[:, 0, 0] = c
    return stillsky.Monitor.from_calibration([0.01, fs], frf, 1.5, sample_rate_hz=fs, **kw)


def independent(m, x):
    """Image x and y (arcsec) of samples x (n, n_axes) by scipy's lfilter on the monitor's taps
    (zero initial state, as after creation)."""
    y = np.zeros((2, x.shape[0]))
    for o in range(2):
        for a in range(m.n_axes):
            y[o] += scipy.signal.lfilter(m.fir(o, a), [1.0], x[:, a])
    return y


def window_rms(sq, w):
    """Running mean square over the last w samples (zeros before the start), per sample."""
    c = np.concatenate([[0.0], np.cumsum(sq)])
    i = np.arange(1, sq.size + 1)
    return (c[i] - c[np.maximum(i - w, 0)]) / w


def flag_states(rms, m, hysteresis, hold_off_s):
    """The flag rules of the core's docs restated: on above the threshold, off below
    threshold·(1 − hysteresis) once on for hold_off; only once L + W samples have arrived."""
    thr = m.threshold_arcsec
    hold = math.ceil(hold_off_s * m.sample_rate_hz)
    flag, on_for = False, 0
    states = []
    for i, r in enumerate(rms):
        if i + 1 < m.warmup_samples:
            states.append("unsafe")
            continue
        if flag:
            on_for += 1
            if r < thr * (1.0 - hysteresis) and on_for >= hold:
                flag = False
        elif r > thr:
            flag, on_for = True, 0
        states.append("above" if flag else "quiet")
    return states


def test_readings_match_lfilter_on_the_taps_and_the_flag_rules(rig):
    fs, hyst, hold = 200.0, 0.3, 0.5
    m = stillsky.Monitor.from_model(
        rig, "xy", sample_rate_hz=fs, window_s=1.0, threshold_arcsec=3.0, hysteresis=hyst,
        hold_off_s=hold, highpass_hz=4.0, fir_taps=256,
    )
    assert (m.n_axes, m.fir_taps, m.window_samples, m.warmup_samples) == (2, 256, 200, 456)
    assert m.latency_s == pytest.approx(32 / fs, rel=1e-15)
    rng = np.random.default_rng(7)
    n = 6000
    # Noise whose level steps up and down (bursts at known places) so the flag toggles.
    level = np.where((np.arange(n) // 700) % 3 == 1, 1.0, 0.15)
    x = np.ascontiguousarray(rng.normal(size=(n, 2)) * level[:, None] * 0.05)
    y = independent(m, x)
    ms = window_rms(y[0] ** 2, 200), window_rms(y[1] ** 2, 200)
    rms = np.sqrt(ms[0] + ms[1])
    want = flag_states(rms, m, hyst, hold)
    assert "above" in want and want.count("quiet") > 1000, "the scenario must toggle the flag"
    # Random block sizes; a tick at the last sample of each block (fresh data).
    i = 0
    got, ends = [], []
    while i < n:
        b = int(rng.integers(1, 97))
        b = min(b, n - i)
        m.push(i / fs, x[i : i + b])
        i += b
        r = m.tick((i - 1) / fs)
        got.append(r.state)
        ends.append(i - 1)
        if r.state != "unsafe":
            # Compensated running sums in the core, plain cumsum here: agree to 1e-9.
            assert r.rms_x_arcsec == pytest.approx(math.sqrt(ms[0][i - 1]), rel=1e-9)
            assert r.rms_y_arcsec == pytest.approx(math.sqrt(ms[1][i - 1]), rel=1e-9)
            assert r.rms_px == pytest.approx(r.rms_arcsec / m.plate_scale_arcsec_per_px, rel=1e-12)
            assert r.reason == "none" and abs(r.age_s) < 1e-9
        else:
            assert r.reason == "warming_up" and math.isnan(r.rms_arcsec)
    assert got == [want[e] for e in ends]


def test_exposure_quality_matches_numpy(rig):
    fs = 200.0
    m = stillsky.Monitor.from_model(
        rig, "xy", sample_rate_hz=fs, window_s=0.5, threshold_arcsec=2.5, hysteresis=0.2,
        hold_off_s=0.2, highpass_hz=8.0, fir_taps=128,
    )
    rng = np.random.default_rng(3)
    n = 3000
    level = np.where((np.arange(n) > 1500) & (np.arange(n) < 1900), 1.0, 0.2)
    x = rng.normal(size=(n, 2)) * level[:, None] * 0.05
    y = independent(m, x)
    sq = y[0] ** 2 + y[1] ** 2
    rms = np.sqrt(window_rms(y[0] ** 2, 100) + window_rms(y[1] ** 2, 100))
    flag = np.array(flag_states(rms, m, 0.2, 0.2)) == "above"
    lat = round(m.latency_s * fs)  # 16 samples
    t_begin, t_end = 1200 / fs, 2400 / fs
    m.push(0.0, x[:1200])
    m.exposure_begin(t_begin)
    last = 2400 + lat  # push up to t_end + latency: samples 1200 + lat .. 2400 + lat - 1 count
    m.push(1200 / fs, x[1200:last])
    q = m.exposure_end(t_end)
    idx = np.arange(1200 + lat, last)
    assert q.duration_s == pytest.approx(6.0)
    assert q.coverage == pytest.approx(1.0)
    assert q.rms_arcsec == pytest.approx(math.sqrt(sq[idx].mean()), rel=1e-9)
    assert q.rms_px == pytest.approx(q.rms_arcsec / m.plate_scale_arcsec_per_px, rel=1e-12)
    assert q.max_window_rms_arcsec == pytest.approx(rms[idx].max(), rel=1e-9)
    assert q.above_fraction == pytest.approx(flag[idx].mean(), abs=1e-12)
    assert 0.1 < q.above_fraction < 0.9


def test_sine_gives_amplitude_over_root_two():
    # RMS of a sinusoid of amplitude A is A/√2 (elementary); far above the high-pass a flat
    # calibration c (rad per m/s²) gives c·A/√2 rad on image_x and nothing on image_y.
    c, a, fs = 2e-7, 0.3, 200.0
    m = flat(c, fs, window_s=2.0, fir_taps=512, highpass_hz=2.0)
    n = m.warmup_samples + 400
    x = a * np.sin(2 * np.pi * 25.0 * np.arange(n) / fs)
    m.push(0.0, x)
    r = m.tick((n - 1) / fs)
    assert r.state == "quiet"
    assert r.rms_x_arcsec == pytest.approx(c * a / math.sqrt(2) * ARCSEC_PER_RAD, rel=1e-3)
    assert r.rms_y_arcsec < 1e-9 * r.rms_x_arcsec


def test_fir_design_against_scipy_butterworth():
    # The taps' response (scipy.signal.freqz) against the intended one: c · the 4th-order analog
    # Butterworth high-pass (scipy.signal.butter(analog=True), evaluated by freqs) · a delay of
    # the latency. Within the passband, away from the corner, the windowing changes it < 1 %.
    c, fs, fc = 1e-6, 200.0, 2.0
    m = flat(c, fs, fir_taps=512, highpass_hz=fc)
    f = np.linspace(8.0, 80.0, 37)
    w, h = scipy.signal.freqz(m.fir(0, 0), worN=f, fs=fs)
    b, a = scipy.signal.butter(4, 2 * np.pi * fc, btype="highpass", analog=True)
    _, hp = scipy.signal.freqs(b, a, worN=2 * np.pi * f)
    want = c * ARCSEC_PER_RAD * hp * np.exp(-2j * np.pi * f * m.latency_s)
    assert np.max(np.abs(h - want) / np.abs(want)) < 0.01
    assert np.max(np.abs(m.fir(1, 0))) == 0.0


def test_windowed_rms_agrees_with_the_offline_estimate(rig):
    # A multisine of known one-sided PSD S on 3–40 Hz per axis (lines of amplitude A with
    # A²/2 = S·Δf, x on even and y on odd lines of a 0.05 Hz comb, so they share no line) over
    # one whole period: its windowed RMS against Model.image_motion for the same PSDs (as
    # bindings-c/tests/c/monitor.c does through the C API): within 5 %.
    fs, df, period, s_acc = 200.0, 0.05, 4000, 1e-5
    rng = np.random.default_rng(11)
    t = np.arange(period) / fs
    x = np.zeros((period, 2))
    for k in range(60, 801):
        x[:, k % 2] += math.sqrt(2 * s_acc * 2 * df) * np.cos(2 * np.pi * k * df * t + rng.uniform(0, 2 * np.pi))
    m = stillsky.Monitor.from_model(rig, "xy", sample_rate_hz=fs, window_s=period / fs, threshold_arcsec=1e3, fir_taps=1024)
    n = 6000
    xs = np.tile(x, (2, 1))[:n]
    m.push(0.0, xs)
    r = m.tick((n - 1) / fs)
    f = 3.0 + 0.01 * np.arange(3701)
    psd = stillsky.Psd(f, np.full(f.size, s_acc), "acceleration")
    im = rig.image_motion(f, ground={"x": psd, "y": psd})
    assert r.rms_x_arcsec == pytest.approx(im.per_axis_arcsec[0], rel=0.05)
    assert r.rms_y_arcsec == pytest.approx(im.per_axis_arcsec[1], rel=0.05)
    assert r.rms_arcsec == pytest.approx(im.rms_arcsec, rel=0.05)


def test_unsafe_states_gap_stale_bad_sample():
    fs = 100.0
    m = flat(1e-6, fs, window_s=1.0, fir_taps=128, highpass_hz=4.0, max_age_s=0.5)
    r = m.tick(0.0)
    assert (r.state, r.reason) == ("unsafe", "warming_up") and math.isnan(r.last_sample_time_s)
    m.push(0.0, np.zeros(300))
    assert m.tick(2.99).state == "quiet"
    r = m.tick(3.6)
    assert (r.state, r.reason) == ("unsafe", "stale") and r.age_s == pytest.approx(0.61)
    assert m.reading().reason == "stale"
    m.push(3.0, np.zeros(10))
    assert m.tick(3.1).state == "quiet"
    m.push(5.0, np.zeros(10))  # a jump of 1.9 s: a gap
    assert m.tick(5.1).reason == "gap"
    m.push(5.1, np.zeros(300))
    assert m.tick(8.09).state == "quiet"
    bad = np.zeros(10)
    bad[4] = np.nan
    with pytest.raises(stillsky.InvalidInputError, match="sample 4 of channel 0"):
        m.push(8.1, bad)
    r = m.tick(8.2)
    assert (r.state, r.reason) == ("unsafe", "bad_sample")
    m.reset()
    assert m.tick(9.0).reason == "warming_up"


def test_layouts_read_in_place_or_copied_give_the_same_readings(rig):
    fs = 200.0
    rng = np.random.default_rng(5)
    x = rng.normal(size=(2000, 2)) * 0.01
    kw = dict(sample_rate_hz=fs, window_s=1.0, fir_taps=256, highpass_hz=4.0)
    variants = [
        x,  # C-contiguous: read in place
        np.asfortranarray(x),  # column-major: copied into row-major order
        np.ascontiguousarray(np.repeat(x, 2, axis=0)[::2]),  # same values, another buffer
        x.tolist(),  # a list: converted once
    ]
    ro = x.copy()
    ro.flags.writeable = False
    variants.append(ro)  # read-only arrays are fine
    readings = []
    for v in variants:
        m = stillsky.Monitor.from_model(rig, "xy", **kw)
        m.push(0.0, v)
        readings.append(m.tick(1999 / fs).rms_arcsec)
    assert all(r == readings[0] for r in readings), readings
    # One channel: a strided 1-D view equals its contiguous copy.
    z = rng.normal(size=4000)
    a, b = flat(1e-6, fs, window_s=1.0, fir_taps=256, highpass_hz=4.0), flat(1e-6, fs, window_s=1.0, fir_taps=256, highpass_hz=4.0)
    a.push(0.0, z[::2])
    b.push(0.0, np.ascontiguousarray(z[::2]))
    assert a.tick(1999 / fs).rms_arcsec == b.tick(1999 / fs).rms_arcsec


def test_bad_input_raises_named_errors(rig):
    fs = 200.0
    m = stillsky.Monitor.from_model(rig, "xy", sample_rate_hz=fs, fir_taps=256, highpass_hz=4.0)
    with pytest.raises(TypeError, match="samples: expected float64"):
        m.push(0.0, np.zeros((10, 2), dtype=np.int64))
    with pytest.raises(stillsky.InvalidInputError, match="n_axes"):
        m.push(0.0, np.zeros((10, 3)))
    with pytest.raises(stillsky.InvalidInputError, match=r"shape \(n, 2\)"):
        m.push(0.0, np.zeros(10))
    with pytest.raises(stillsky.InvalidInputError, match="empty"):
        m.push(0.0, np.zeros((0, 2)))
    with pytest.raises(stillsky.InvalidInputError, match="t0_s"):
        m.push(math.inf, np.zeros((4, 2)))
    m.push(1.0, np.zeros((4, 2)))
    with pytest.raises(stillsky.InvalidInputError, match="t0_s"):
        m.push(0.5, np.zeros((4, 2)))  # back in time
    with pytest.raises(stillsky.InvalidInputError, match="now_s"):
        m.tick(math.nan)
    with pytest.raises(stillsky.InvalidInputError, match="no exposure is open"):
        m.exposure_end(2.0)
    m.exposure_begin(2.0)
    with pytest.raises(stillsky.InvalidInputError, match="already open"):
        m.exposure_begin(2.5)
    with pytest.raises(stillsky.InvalidInputError, match="before the exposure began"):
        m.exposure_end(1.0)
    with pytest.raises(stillsky.InvalidInputError, match="image_axis"):
        m.fir(2, 0)
    with pytest.raises(stillsky.InvalidInputError, match="hysteresis"):
        stillsky.Monitor.from_model(rig, "x", hysteresis=1.0)
    with pytest.raises(stillsky.InvalidInputError, match="fir_taps"):
        stillsky.Monitor.from_model(rig, "x", fir_taps=1 << 20)
    with pytest.raises(stillsky.InvalidInputError, match="fir_taps"):
        stillsky.Monitor.from_model(rig, "x", fir_taps=33)
    with pytest.raises(stillsky.InvalidInputError, match="highpass_hz"):
        stillsky.Monitor.from_model(rig, "x", highpass_hz=0.1)
    with pytest.raises(stillsky.InvalidInputError, match="repeats"):
        stillsky.Monitor.from_model(rig, "xx")
    with pytest.raises(stillsky.InvalidInputError, match="optics"):
        stillsky.Monitor.from_model(stillsky.Model.from_toml_str(RIG.split("[optics]")[0]), "x")
    with pytest.raises(stillsky.InvalidInputError, match="shape"):
        stillsky.Monitor.from_calibration([1.0, 2.0], np.zeros((2, 2)), 1.0)
    with pytest.raises(stillsky.InvalidInputError, match="frf rows"):
        stillsky.Monitor.from_calibration([1.0, 2.0, 3.0], np.zeros((2, 2, 1)), 1.0)
    with pytest.raises(stillsky.InvalidInputError, match="freq_hz"):
        stillsky.Monitor.from_calibration([2.0, 1.0], np.zeros((2, 2, 1)), 1.0)
    with pytest.raises(stillsky.InvalidInputError, match="not finite"):
        stillsky.Monitor.from_calibration([1.0, 2.0], np.full((2, 2, 1), np.nan), 1.0)
    with pytest.raises(stillsky.InvalidInputError, match="plate_scale"):
        stillsky.Monitor.from_calibration([1.0, 2.0], np.zeros((2, 2, 1)), -1.0)
    with pytest.raises(TypeError, match="float32"):
        m.push(5.0, np.zeros((10, 2), dtype=np.float32))


def test_a_busy_monitor_refuses_a_second_thread():
    # push releases the GIL; a call from another thread meanwhile gets RuntimeError (pyo3's
    # borrow check), never a data race.
    import threading

    m = flat(1e-6, 200.0, window_s=1.0, fir_taps=1024, highpass_hz=1.0)
    x = np.zeros(100_000)
    th = threading.Thread(target=m.push, args=(0.0, x))
    caught = False
    th.start()
    while th.is_alive() and not caught:
        try:
            m.tick(0.0)
        except RuntimeError as e:
            caught = "borrow" in str(e).lower()
    th.join()
    assert caught
    assert m.tick(99_999 / 200.0).state == "quiet"
