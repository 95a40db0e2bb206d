"""stillsky.static_checks: leg stress, buckling and tipping of a rig file, by hand."""

import math
import pathlib
import re

import numpy as np
import pytest

import stillsky
from conftest import sdof_toml

EXAMPLE = pathlib.Path(__file__).resolve().parents[2] / "docs" / "examples" / "tripod-lawn.toml"
G = 9.80665
IN = 0.0254
OD, WALL = 2.0 * IN, 0.049 * IN
E, YIELD = 200e9, 250e6
LEG_L, SPLAY = 2.5, 22.0


def tall_rig_text():
    """The demo tripod with 2.0 in OD × 0.049 in steel legs 2.5 m long (invented, slender enough
    for the Euler regime)."""
    t = EXAMPLE.read_text()
    t = re.sub(r"leg_length_m = .*", f"leg_length_m = {LEG_L}", t)
    t = re.sub(r"splay_deg = .*", f"splay_deg = {SPLAY}", t)
    t = re.sub(r"leg_section = .*", f'leg_section = {{ shape = "tube", outer_diameter_m = {OD!r}, wall_m = {WALL!r} }}', t)
    t = re.sub(
        r'leg_material = .*',
        f"leg_material_properties = {{ youngs_modulus_pa = {E!r}, poisson_ratio = 0.3, density_kg_m3 = 7850.0, "
        f"yield_strength_pa = {YIELD!r}, loss_factor = 0.001 }}",
        t,
    )
    return t


def total_mass_kg(model):
    # Rigid translation r (static response of every DOF to a unit ground z motion) and
    # m_total = rᵀ M r (rigid-body mass of the free structure).
    mats = model.matrices(0.0)
    r = np.linalg.solve(mats["stiffness"], model.input_vector("ground_z")).real
    return float(r @ mats["mass"] @ r)


def test_leg_stress_and_euler_by_hand():
    m = stillsky.Model.from_toml_str(tall_rig_text(), "tall-rig.toml")
    # Still air: the foot reactions come from the weight at the centre of gravity alone.
    rep = stillsky.static_checks(m, design_wind_m_s=0.0, gust_factor=1.5)
    by_name = {c["name"].split(" (")[0]: c for c in rep}
    st, bk = by_name["leeward leg axial stress"], by_name["leeward leg buckling"]
    cg_note = next(n for n in rep.notes if n.startswith("mass above the feet"))
    mass, cx, cy = (float(v) for v in re.search(r"([\d.]+) kg, centre of gravity \(([-\d.]+), ([-\d.]+),", cg_note).groups())
    # The mass above the feet is the model's rigid-body mass.
    assert mass == pytest.approx(total_mass_kg(m), abs=0.05)
    # Statics of a tripod, feet at azimuths 0°, 120°, 240° on a circle of radius R: R_i = W/3 +
    # W (c·p_i) / (3R²/2) (three equations, three unknowns); leg load N = R_max / cos θ.
    toml = tall_rig_text()
    radius = float(re.search(r"head_radius_m = ([\d.]+)", toml).group(1)) + LEG_L * math.sin(math.radians(SPLAY))
    w = total_mass_kg(m) * G
    feet = [(radius * math.sin(math.radians(a)), radius * math.cos(math.radians(a))) for a in (0.0, 120.0, 240.0)]
    r_max = max(w / 3 + w * (cx * x + cy * y) / (1.5 * radius**2) for x, y in feet)
    load = r_max / math.cos(math.radians(SPLAY))
    assert bk["value"] == pytest.approx(load, rel=2e-3)  # the CG is printed to 1 mm
    assert load >= w / (3 * math.cos(math.radians(SPLAY)))
    # Axial stress N / A, A = π/4 (OD² − ID²) for a tube.
    ID = OD - 2 * WALL
    area = math.pi / 4 * (OD**2 - ID**2)
    # docs/references.md#s9 check value: this tube has A = 0.300333 in², so 40 lbf gives 133.19 psi.
    assert area / IN**2 == pytest.approx(0.300333, rel=2e-6)
    assert 40.0 / (area / IN**2) == pytest.approx(133.19, rel=1e-4)
    assert st["value"] == pytest.approx(bk["value"] / area, rel=1e-9)
    assert st["limit"] == YIELD and st["unit"] == "Pa"
    assert st["factor_of_safety"] == pytest.approx(YIELD / (bk["value"] / area), rel=1e-12)
    # Euler load π² E I / (K L)², I = π/64 (OD⁴ − ID⁴), K = 1 (pinned–pinned); KL/r ≈ 143 is
    # above the transition slenderness √(2π²E/σ_y) ≈ 126, so Euler governs.
    I = math.pi / 64 * (OD**4 - ID**4)
    assert LEG_L / math.sqrt(I / area) > math.sqrt(2 * math.pi**2 * E / YIELD)
    assert bk["limit"] == pytest.approx(math.pi**2 * E * I / LEG_L**2, rel=1e-12)
    assert bk["unit"] == "N"
    for c in rep:
        assert c["verdict"] in ("pass", "marginal", "fail")
        assert set(c) == {"name", "value", "limit", "unit", "factor_of_safety", "verdict"}
    assert any(c["name"].startswith("tipping") and c["unit"] == "N m" for c in rep)
    assert "licensed engineer" in rep.cautions and "estimates" in rep.cautions
    assert rep.verdict in ("pass", "marginal", "fail")
    assert rep.min_factor_of_safety == min(c["factor_of_safety"] for c in rep)
    assert len(rep.checks) == len(rep) and rep[-1] == rep.checks[-1]
    s = rep.summary()
    assert s["design_wind_m_s"] == 0.0 and s["gust_factor"] == 1.5 and len(s["cautions"]) >= 3
    assert s["top_load_n"] == 22.0 and s["foot_surface"] is None and s["notes"] == rep.notes


def test_path_and_model_agree():
    a = stillsky.static_checks(EXAMPLE)
    b = stillsky.static_checks(stillsky.Model.from_toml(EXAMPLE))
    assert a.checks == b.checks


def test_stronger_wind_lowers_tipping_margin():
    # Wind moment grows as U² (drag ½ρC_dAU²), restoring moment is fixed: FoS ∝ 1/U².
    tip = lambda rep: next(c for c in rep if c["name"].startswith("tipping"))
    a = tip(stillsky.static_checks(EXAMPLE, design_wind_m_s=5.0))
    b = tip(stillsky.static_checks(EXAMPLE, design_wind_m_s=10.0))
    assert a["factor_of_safety"] / b["factor_of_safety"] == pytest.approx(4.0, rel=1e-9)


def test_static_checks_bad_inputs(tmp_path):
    with pytest.raises(stillsky.InvalidInputError, match=r"\[tripod\] or \[pier\]"):
        stillsky.static_checks(stillsky.Model.from_toml_str(sdof_toml()))
    missing = tmp_path / "missing.toml"
    with pytest.raises(stillsky.StillskyIOError, match="missing.toml"):
        stillsky.static_checks(missing)
    with pytest.raises(stillsky.InvalidInputError, match="gust_factor"):
        stillsky.static_checks(EXAMPLE, gust_factor=0.0)
    with pytest.raises(stillsky.InvalidInputError, match="speed_m_s"):
        stillsky.static_checks(EXAMPLE, design_wind_m_s=-1.0)
    with pytest.raises(TypeError, match="model_or_path"):
        stillsky.static_checks(42)
    with pytest.raises(stillsky.InvalidInputError, match="rubber-on-paver"):
        stillsky.static_checks(EXAMPLE, foot_surface="ice")
    with pytest.raises(IndexError):
        stillsky.static_checks(EXAMPLE)[99]


def test_sliding_uses_the_surface():
    # Sliding capacity is μ × the vertical reactions: rubber on a paver (μ 0.6, common practice)
    # holds twice what plastic on concrete (μ 0.3) does.
    slide = lambda rep: next(c for c in rep if c["name"].startswith("sliding"))
    a = slide(stillsky.static_checks(EXAMPLE, foot_surface="rubber-on-paver"))
    b = slide(stillsky.static_checks(EXAMPLE, foot_surface="plastic-on-concrete"))
    assert a["limit"] / b["limit"] == pytest.approx(2.0, rel=1e-12)
    assert a["value"] == b["value"]
