"""stillsky.spring_variants: rank-k spring replacement against the direct FRF of rebuilt models."""

import json

import numpy as np
import pytest

import stillsky


def chain(pads):
    """Three masses on a vertical chain; `pads` gives the stiffness lines of s0, s1, s2."""
    s = []
    for i in range(3):
        s.append(
            f'[[body]]\nname = "m{i}"\nmass_kg = {2.0 + i}\ncg_m = [0, 0, {0.1 * i}]\n'
            'inertia_kgm2 = [1, 1, 1]\ndofs = ["z"]\n\n'
        )
    for i in range(3):
        frm = "ground" if i == 0 else f"m{i - 1}"
        s.append(
            f'[[spring]]\nname = "s{i}"\nfrom = "{frm}"\nto = "m{i}"\nat_m = [0, 0, {0.1 * i}]\n'
            f"direction = [0, 0, 1]\n{pads[i]}\n\n"
        )
    return stillsky.Model.from_toml_str("".join(s), "chain")


BASE = ["stiffness_n_per_m = 1e6\nloss_factor = 0.02"] * 3


def test_matches_rebuilt_models_and_numpy_rms():
    # Oracle: the direct FRF of a model file written with the replacement springs, and the RMS
    # as numpy's trapezoid integral of |H|^2 S (docs/conventions.md: RMS by the trapezoid rule).
    f = np.linspace(1.0, 300.0, 500)
    psd = 1e-12 * np.ones_like(f)
    variants = [
        ([{"zener": {"k0": 3e5, "k_inf": 9e5, "tau_s": 0.002}}, {"kelvin_voigt": {"k": 8e5, "c": 60.0}}],
         ["zener = { k0 = 3e5, k_inf = 9e5, tau_s = 0.002 }", "stiffness_n_per_m = 8e5\ndamping_ns_per_m = 60.0"]),
        ([{"hysteretic": {"k": 2e6, "loss_factor": 0.2}}, {"hysteretic": {"k": 5e5, "loss_factor": 0.05}}],
         ["stiffness_n_per_m = 2e6\nloss_factor = 0.2", "stiffness_n_per_m = 5e5\nloss_factor = 0.05"]),
    ]
    base = chain(BASE)
    h, rms = stillsky.spring_variants(
        base, ["s0", "s2"], json.dumps([v[0] for v in variants]), f, "ground_z", "m2:z", input_psd=psd
    )
    assert h.shape == (2, f.size, 1, 1) and rms.shape == (2, 1, 1)
    for v, (_, lines) in enumerate(variants):
        direct = chain([lines[0], BASE[1], lines[1]]).frf(f, "ground_z", "m2:z")
        np.testing.assert_allclose(h[v, :, 0, 0], direct, rtol=1e-9, atol=1e-9 * np.abs(direct).max())
        want = np.sqrt(np.trapezoid(np.abs(direct) ** 2 * psd, f))
        assert rms[v, 0, 0] == pytest.approx(want, rel=1e-9)
    # Without the FRFs: the same RMS (same arithmetic), and no FRF array.
    none, rms_only = stillsky.spring_variants(
        base, ["s0", "s2"], json.dumps([v[0] for v in variants]), f, "ground_z", "m2:z", input_psd=psd, frf=False
    )
    assert none is None
    np.testing.assert_array_equal(rms_only, rms)


def test_bad_input_is_a_value_error():
    base = chain(BASE)
    f = np.array([1.0, 2.0])
    one = json.dumps([[{"hysteretic": {"k": 1e6, "loss_factor": 0.1}}]])
    with pytest.raises(stillsky.StillskyError):
        stillsky.spring_variants(base, ["nope"], one, f, "ground_z", "m2:z", input_psd=[1.0, 1.0])
    with pytest.raises(stillsky.StillskyError, match="replacements_json"):
        stillsky.spring_variants(base, ["s0"], "[[{]]", f, "ground_z", "m2:z", input_psd=[1.0, 1.0])
    with pytest.raises(stillsky.StillskyError):
        stillsky.spring_variants(base, ["s0"], one, f, "ground_z", "m2:z", input_psd=[1.0])
    with pytest.raises(stillsky.StillskyError):
        stillsky.spring_variants(base, ["s0"], one, [2.0, 1.0], "ground_z", "m2:z", input_psd=[1.0, 1.0])
