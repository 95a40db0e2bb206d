"""Pickling of Model (as its model-file text) and Psd (arrays and quantity)."""

import pathlib
import pickle

import numpy as np

import stillsky
from conftest import random_chain_toml

EXAMPLE = pathlib.Path(__file__).resolve().parents[2] / "docs" / "examples" / "tripod-lawn.toml"


def test_model_pickle_round_trip_is_bit_identical():
    f = np.geomspace(0.5, 150.0, 300)
    for m in (stillsky.Model.from_toml(EXAMPLE), stillsky.Model.from_toml_str(random_chain_toml(3))):
        m2 = pickle.loads(pickle.dumps(m))
        assert m2.dof_labels == m.dof_labels and m2.input_names == m.input_names
        ins, outs = m.input_names[:4], m.output_names[:5]
        np.testing.assert_array_equal(m2.frf(f, ins, outs), m.frf(f, ins, outs))
        np.testing.assert_array_equal(m2.modes().frequency_hz, m.modes().frequency_hz)
    # The rig layer survives, so static checks still work after a round trip.
    m = pickle.loads(pickle.dumps(stillsky.Model.from_toml(EXAMPLE)))
    assert stillsky.static_checks(m).checks == stillsky.static_checks(EXAMPLE).checks


def test_psd_pickle_round_trip_is_bit_identical():
    f = np.geomspace(0.1, 10.0, 77)
    p = stillsky.reference_ground("nlnm", f)
    q = pickle.loads(pickle.dumps(p))
    assert isinstance(q, stillsky.Psd) and q.quantity == p.quantity
    np.testing.assert_array_equal(q.freq_hz, p.freq_hz)
    np.testing.assert_array_equal(q.values, p.values)
    v = pickle.loads(pickle.dumps(p.to("velocity")))
    assert v.quantity == "velocity"
    np.testing.assert_array_equal(v.values, p.to("velocity").values)
