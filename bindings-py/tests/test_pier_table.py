"""stillsky.pier_table against the cantilever formulas computed here with numpy, and one row
against the modes of the same column written by hand as a generic-layer model.

Formulas: tip load on a cantilever, θ = F L²/(2EI), δ = F L³/(3EI) (Roark's Formulas for
Stress and Strain, beam tables; from memory: verify), plus a rigid rotation F L/k_rock of the
base; Rayleigh's method with the static deflection shape for the frequencies (33/140 of the
column mass for a tip-loaded cantilever, Blevins, Formulas for Natural Frequency and Mode
Shape, table 8-1; from memory: verify).
"""

import numpy as np
import pytest

import stillsky

ARCSEC = 180.0 / np.pi * 3600.0
# Preset values as documented in core/src/material.rs (E, nu, rho).
STEEL = (210e9, 0.3, 7850.0)
ALU = (68.9e9, 0.33, 2700.0)


def formulas(od, t, length, mat, f, m_top, j_top, k_rock=np.inf, fill=0.0):
    e, nu, rho = mat
    di = od - 2 * t
    i = np.pi / 64 * (od**4 - di**4)
    area = np.pi / 4 * (od**2 - di**2)
    g = e / (2 * (1 + nu))
    m_col = (rho * area + fill * np.pi / 4 * di**2) * length
    th_b = f * length**2 / (2 * e * i)
    th_r = f * length / k_rock
    d_b = f * length**3 / (3 * e * i)
    d_r = th_r * length
    delta = d_b + d_r
    m_eff = m_col * (33 / 140 * d_b**2 + 11 / 20 * d_b * d_r + d_r**2 / 3) / delta**2
    f_b = np.sqrt(f / delta / (m_top + m_eff)) / (2 * np.pi)
    j = 2 * i
    f_t = np.sqrt(g * j / length / (j_top + rho * j * length / 3)) / (2 * np.pi)
    return (th_b + th_r) * ARCSEC, delta, f_b, f_t, m_col


@pytest.mark.parametrize("k_rock", [None, 3.0e5])
def test_table_against_numpy_formulas(k_rock):
    ods, walls, heights = [0.1143, 0.1683, 0.2191], [0.005, 0.008], [1.0, 1.5]
    t = stillsky.pier_table(
        ods,
        walls,
        heights,
        ["steel-s235", "aluminium-6061-t6"],
        fill_density_kg_m3=1600.0,
        load_n=22.0,
        top_mass_kg=35.0,
        top_inertia_kgm2=0.8,
        rocking_nm_per_rad=k_rock,
    )
    assert len(t["tilt_arcsec"]) == 24
    k = np.inf if k_rock is None else k_rock
    for n in range(24):
        mat = STEEL if t["material"][n] == "steel-s235" else ALU
        th, de, fb, ft, mc = formulas(
            t["outer_diameter_m"][n], t["wall_m"][n], t["height_m"][n], mat, 22.0, 35.0, 0.8, k, 1600.0
        )
        assert t["tilt_arcsec"][n] == pytest.approx(th, rel=1e-9)
        assert t["deflection_m"][n] == pytest.approx(de, rel=1e-9)
        assert t["bending_hz"][n] == pytest.approx(fb, rel=1e-9)
        assert t["torsion_hz"][n] == pytest.approx(ft, rel=1e-9)
        assert t["column_mass_kg"][n] == pytest.approx(mc, rel=1e-9)
        # The beam model's static tilt (cubic elements are exact for a tip load).
        assert t["model_tilt_arcsec"][n] == pytest.approx(th, rel=1e-6)
    # outer diameter varies slowest, material fastest
    assert list(t["outer_diameter_m"][:8]) == [0.1143] * 8
    assert t["material"][:2] == ["steel-s235", "aluminium-6061-t6"]


def test_one_row_against_hand_written_model_modes():
    od, wall, h, m_top, j_top = 0.1683, 0.006, 1.3, 40.0, 1.0
    t = stillsky.pier_table([od], [wall], [h], ["steel-s235"])
    tiny = 1e-9 * m_top * h * h
    toml = f"""
[[body]]
name = "top"
mass_kg = {m_top}
cg_m = [0, 0, {h}]
inertia_kgm2 = [{tiny}, {tiny}, {j_top}]

[[beam]]
name = "column"
from = "ground"
to = "top"
from_at_m = [0, 0, 0]
to_at_m = [0, 0, {h}]
section = {{ shape = "tube", outer_diameter_m = {od}, wall_m = {wall} }}
material = "steel-s235"
elements = 16
"""
    modes = stillsky.Model.from_toml_str(toml).modes()
    dom = modes.dominant_dofs
    f = np.asarray(modes.frequency_hz)
    bend = f[[d in ("top:x", "top:y") for d in dom]][0]
    twist = f[[d == "top:rz" for d in dom]][0]
    assert t["model_bending_hz"][0] == pytest.approx(bend, rel=1e-9)
    assert t["model_torsion_hz"][0] == pytest.approx(twist, rel=1e-9)
    # Rayleigh's estimate bounds the exact frequency from above, closely for a heavy top.
    assert bend <= t["bending_hz"][0] * (1 + 1e-9)
    assert t["bending_hz"][0] == pytest.approx(bend, rel=5e-3)


def test_soil_footing_and_bad_inputs():
    t = stillsky.pier_table([0.1683], [0.006], [1.3], soil="lawn", footing_diameter_m=0.8)
    # 8 G R^3 / (3 (1 - nu)) for the lawn preset (G 20 MPa, nu 0.33), see docs/model-file.md.
    k = 8 * 20e6 * 0.4**3 / (3 * (1 - 0.33))
    assert t["rocking_nm_per_rad"][0] == pytest.approx(k, rel=1e-12)
    assert t["tilt_rocking_arcsec"][0] == pytest.approx(22.0 * 1.3 / k * ARCSEC, rel=1e-9)
    with pytest.raises(stillsky.InvalidInputError, match="walls_m"):
        stillsky.pier_table([0.1], [0.06], [1.0])
    with pytest.raises(stillsky.InvalidInputError, match="heights_m"):
        stillsky.pier_table([0.1], [0.006], [])
    with pytest.raises(stillsky.InvalidInputError, match="cheese"):
        stillsky.pier_table([0.1], [0.006], [1.0], ["cheese"])
    with pytest.raises(stillsky.InvalidInputError, match="footing_diameter_m"):
        stillsky.pier_table([0.1], [0.006], [1.0], soil="lawn")
    with pytest.raises(stillsky.InvalidInputError, match="top_mass_kg"):
        stillsky.pier_table([0.1], [0.006], [1.0], top_mass_kg=-1.0)
