"""Wind loads derived from a rig's parts, summed independently in numpy.

The independent computation follows the cross-flow principle (Hoerner, Fluid-Dynamic Drag, 1965,
ch. 3; DNV-RP-C205, 2010, section 6.2): a cylinder at angle theta to the flow takes
1/2 rho U^2 Cd D L sin^2(theta) along the flow's component across its axis, and an end disc
1/2 rho U^2 Cd (pi D^2/4) cos^2(theta) along the axis at the upwind end. A member loaded along
its length puts half its load at each end (the pier column at L/6 in from its top, the
consistent end moment of a uniformly loaded beam); the half at the fixed ground carries nothing.
"""

import numpy as np
import pytest

import stillsky

RIG = """
[optics]
focal_length_mm = 2000
pixel_um = 3.76
altitude_deg = {alt}
azimuth_deg = {az}

[payload]
parts = [
  {{ name = "tube", kind = "tube", mass_kg = 9, length_m = 0.7, diameter_m = 0.25, position_m = 0.08, shaft_m = 0.18 }},
  {{ name = "camera", kind = "cylinder", mass_kg = 1.5, length_m = 0.15, diameter_m = 0.09, position_m = -0.35, shaft_m = 0.18 }},
  {{ name = "counterweight", kind = "cylinder", axis = "shaft", mass_kg = 7, length_m = 0.08, diameter_m = 0.12, shaft_m = -0.28 }},
]

[mount]
mass_kg = 14
inertia_kgm2 = [0.3, 0.3, 0.2]
pivot_height_m = 0.28
tilt_stiffness_nm_per_rad = 3e4
yaw_stiffness_nm_per_rad = 2e4
loss_factor = 0.06
wind_area_m2 = 0.07

[pier]
section = {{ shape = "tube", outer_diameter_m = 0.2, wall_m = 0.006 }}
material = "steel-s235"
height_m = 1.1

[ground]
kind = "rigid"
"""

H, PH, RHO = 1.1, 0.28, 1.225


def cylinder(d_toward, axis, centre, diameter, length, cd_side=1.2, cd_end=1.17):
    """[(point, force per unit dynamic pressure)] of a cylinder's side and upwind end."""
    cos = float(d_toward @ axis)
    across = d_toward - cos * axis
    out = [(centre, cd_side * diameter * length * across * np.linalg.norm(across))]
    if abs(cos) > 1e-9:
        upwind = centre - np.sign(cos) * axis * length / 2
        out.append((upwind, cd_end * np.pi * diameter**2 / 4 * cos * abs(cos) * axis))
    return out


def numpy_resultant(alt, az, wind_from, speed, about):
    a, h, w = np.radians(az), np.radians(alt), np.radians(wind_from)
    d = -np.array([np.sin(w), np.cos(w), 0.0])  # blows towards
    los = np.array([np.sin(a) * np.cos(h), np.cos(a) * np.cos(h), np.sin(h)])
    shaft = np.array([np.cos(a), -np.sin(a), 0.0])
    pivot = np.array([0.0, 0.0, H + PH])
    loads = []
    loads += cylinder(d, los, pivot + 0.08 * los + 0.18 * shaft, 0.25, 0.7)
    loads += cylinder(d, los, pivot - 0.35 * los + 0.18 * shaft, 0.09, 0.15)
    loads += cylinder(d, shaft, pivot - 0.28 * shaft, 0.12, 0.08)
    loads.append((np.array([0.0, 0.0, H + PH / 2]), 1.05 * 0.07 * d))  # mount head
    loads.append((np.array([0.0, 0.0, H - H / 6]), 1.2 * 0.2 * H / 2 * d))  # upper half of the column
    q = 0.5 * RHO * speed**2
    f = sum(q * g for _, g in loads)
    m = sum(np.cross(p - about, q * g) for p, g in loads)
    return f, m


@pytest.mark.parametrize("alt,az,wind_from", [(45.0, 135.0, 200.0), (20.0, 300.0, 270.0), (70.0, 10.0, 95.0)])
def test_summed_forces_and_moments_match_numpy(alt, az, wind_from):
    m = stillsky.Model.from_toml_str(RIG.format(alt=alt, az=az), wind_from_deg=wind_from)
    about = [0.3, -0.2, 1.0]
    f, mom = m.wind_resultant(6.0, air_density_kg_m3=RHO, about_m=about)
    f_np, m_np = numpy_resultant(alt, az, wind_from, 6.0, np.array(about))
    np.testing.assert_allclose(f, f_np, rtol=1e-9, atol=1e-12 * np.abs(f_np).max())
    np.testing.assert_allclose(mom, m_np, rtol=1e-9, atol=1e-12 * np.abs(m_np).max())
    names = {p["name"] for p in m.wind_parts()}
    assert {"tube (side)", "camera (side)", "counterweight (side)", "mount head", "pier column (upper end)"} <= names
    assert "pier column (lower end)" not in names  # on the fixed ground


def test_wind_direction_keyword_equals_the_file_and_hand_written_wind_refuses_it():
    text = RIG.format(alt=45.0, az=135.0)
    a = stillsky.Model.from_toml_str(text, wind_from_deg=200.0)
    b = stillsky.Model.from_toml_str(text + "\n[wind_load]\nfrom_azimuth_deg = 200\n")
    assert a.wind_parts() == b.wind_parts()
    fixed = text + '\n[wind]\nbody = "payload"\ncentre_of_pressure_m = [0, 0, 1.4]\ndirection = [1, 0, 0]\narea_m2 = 0.2\ndrag_coefficient = 1.2\n'
    with pytest.raises(stillsky.InvalidInputError, match="wind direction"):
        stillsky.Model.from_toml_str(fixed, wind_from_deg=90.0)
    assert [p["name"] for p in stillsky.Model.from_toml_str(fixed).wind_parts()] == ["wind"]
    off = stillsky.Model.from_toml_str(text + "\n[wind_load]\nderive = false\n")
    assert off.wind_parts() == []
    with pytest.raises(stillsky.InvalidInputError, match="no wind"):
        off.wind_resultant(4.0)
