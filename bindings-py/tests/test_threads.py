"""Concurrent calls from Python threads give results identical to serial ones."""

from concurrent.futures import ThreadPoolExecutor

import numpy as np

import stillsky
from conftest import random_chain_toml


def test_four_threads_frf_identical_to_serial():
    m = stillsky.Model.from_toml_str(random_chain_toml(7, 8))
    grids = [np.geomspace(0.5 + k, 300.0, 400 + 50 * k) for k in range(8)]
    outs = [o for o in m.output_names][:6]
    serial = [m.frf(g, ["ground_x", "ground_z"], outs) for g in grids]
    with ThreadPoolExecutor(max_workers=4) as ex:
        threaded = list(ex.map(lambda g: m.frf(g, ["ground_x", "ground_z"], outs), grids))
    for a, b in zip(serial, threaded):
        np.testing.assert_array_equal(a, b)


def test_four_threads_welch_identical_to_serial():
    rng = np.random.default_rng(3)
    xs = [rng.normal(size=20000) for _ in range(8)]
    serial = [stillsky.welch(x, 200.0, nperseg=512)[1] for x in xs]
    with ThreadPoolExecutor(max_workers=4) as ex:
        threaded = list(ex.map(lambda x: stillsky.welch(x, 200.0, nperseg=512)[1], xs))
    for a, b in zip(serial, threaded):
        np.testing.assert_array_equal(a, b)


def test_four_threads_image_motion_identical_to_serial():
    import pathlib

    path = pathlib.Path(__file__).resolve().parents[2] / "docs" / "examples" / "tripod-lawn.toml"
    m = stillsky.Model.from_toml(path)
    f = np.geomspace(0.5, 100.0, 300)
    psds = [stillsky.Psd(f, 1e-16 * (1 + k) * (f / 5.0) ** -4, "displacement") for k in range(8)]
    run = lambda p: m.image_motion(f, ground=p).psd  # noqa: E731
    serial = [run(p) for p in psds]
    with ThreadPoolExecutor(max_workers=4) as ex:
        threaded = list(ex.map(run, psds))
    for a, b in zip(serial, threaded):
        np.testing.assert_array_equal(a, b)
