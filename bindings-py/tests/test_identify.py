"""identify_ringdown (result object, per-method values) and compare_ringdowns."""

import numpy as np
import pytest

import stillsky


def decay(f, zeta, fs=1000.0, dur=6.0, amp=1.0, snr_db=None, seed=0):
    # Free decay of a viscous mode x(t) = A e^{−ζω t} cos(ω √(1−ζ²) t) (e.g. Ogata, System Dynamics).
    t = np.arange(0, dur, 1 / fs)
    w = 2 * np.pi * f
    x = amp * np.exp(-zeta * w * t) * np.cos(w * np.sqrt(1 - zeta**2) * t)
    if snr_db is not None:
        rng = np.random.default_rng(seed)
        x = x + rng.normal(scale=np.std(x) / 10 ** (snr_db / 20), size=x.size)
    return x


def test_single_mode_all_methods():
    f, zeta = 8.0, 0.02
    r = stillsky.identify_ringdown(decay(f, zeta, snr_db=35, seed=3), 1000.0)
    assert isinstance(r, stillsky.RingdownId)
    k = r.dominant
    assert r.frequency_hz[k] == pytest.approx(f, rel=5e-3)
    assert r.damping_ratio[k] == pytest.approx(zeta, rel=0.1)
    # Per-method estimates: log decrement, Hilbert envelope fit, half-power bandwidth.
    for name in ("log_decrement", "envelope_fit", "half_power"):
        v = getattr(r, name)
        assert v is not None and v == pytest.approx(zeta, rel=0.1), name
        assert r.methods[name] == pytest.approx(v)
    assert r.log_decrement_cycles >= 1 and r.spread >= 0
    assert r.dominant_frequency_hz == pytest.approx(f, rel=5e-3)
    assert r.dominant_source in ("single_mode", "matrix_pencil")
    assert r.summary()["frequency_hz"] == pytest.approx(list(r.frequency_hz))
    assert isinstance(r.pencil, list) and isinstance(r.warnings, list)


def test_compare_ringdowns_decay_times():
    # Envelope e^{−ζω t}: it falls to 1/e after 1/(ζω) (exact for one viscous mode).
    f = 10.0
    a = decay(f, 0.01, dur=8.0)
    b = decay(f, 0.04, dur=8.0, amp=0.5)
    c = stillsky.compare_ringdowns(a, b, 1000.0)
    w = 2 * np.pi * f
    assert c.before["decay_time_s"] == pytest.approx(1 / (0.01 * w), rel=0.03)
    assert c.after["decay_time_s"] == pytest.approx(1 / (0.04 * w), rel=0.03)
    assert c.decay_time_ratio == pytest.approx(0.25, rel=0.05)
    assert c.excursion_ratio == pytest.approx(0.5, rel=1e-3)
    assert c.summary()["excursion_ratio"] == pytest.approx(c.excursion_ratio)
    c2 = stillsky.compare_ringdowns(a, b, 1000.0, settle_level=0.05)
    assert c2.before["settle_threshold"] == 0.05


def test_identify_bad_inputs():
    with pytest.raises(stillsky.InvalidInputError, match="x"):
        stillsky.identify_ringdown(np.array([1.0, np.nan, 2.0] * 100), 100.0)
    with pytest.raises(stillsky.InvalidInputError):
        stillsky.identify_ringdown(np.ones(5), 100.0)
    with pytest.raises(stillsky.InvalidInputError, match="at most one"):
        stillsky.compare_ringdowns(decay(5, 0.02), decay(5, 0.02), 1000.0, settle_fraction=0.1, settle_level=0.1)
    with pytest.raises(stillsky.InvalidInputError, match="after"):
        stillsky.compare_ringdowns(decay(5, 0.02), np.array([np.nan] * 3000), 1000.0)
