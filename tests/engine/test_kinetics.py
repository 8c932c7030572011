"""Tests of supervisor.engine.kinetics (Schreiner integration).

Outside references: ``scipy.integrate.solve_ivp`` integrating the same ODE
dP/dt = k (P_alv(t) - P) numerically (general-purpose library), and the Haldane
equation's half-time fractions.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from supervisor.engine.buhlmann import load_coefficients
from supervisor.engine.kinetics import (
    LN2,
    final_tensions,
    inspired_pressure,
    rate_constant,
    saturated_tensions,
    schreiner,
    tissue_tensions,
)
from supervisor.errors import InputError

PH2O = 0.0627
C16 = load_coefficients("zhl16c")


def _ode_reference(minutes, p_start, p_end, f_inert, half_time, p0):
    """Integrate dP/dt = k (P_alv(t) - P) with scipy, piecewise linear ambient pressure."""
    k = LN2 / np.asarray(half_time, float)
    y = np.array(p0, float) * np.ones_like(k)
    out = []
    for t, a, b, f in zip(minutes, p_start, p_end, f_inert, strict=True):
        if t == 0:
            out.append(y.copy())
            continue

        def rhs(tt, yy, t=t, a=a, b=b, f=f):
            pamb = a + (b - a) * tt / t
            return k * ((pamb - PH2O) * f - yy)

        sol = solve_ivp(rhs, (0.0, t), y, method="DOP853", rtol=1e-12, atol=1e-12)
        y = sol.y[:, -1]
        out.append(y.copy())
    return np.array(out)


@pytest.mark.parametrize("gas", ["n2", "he"])
@pytest.mark.parametrize(
    "segment",
    [
        (1.5, 1.01325, 4.0),  # compression
        (4.0, 4.0, 1.9),  # decompression
        (20.0, 4.0, 4.0),  # constant depth
    ],
    ids=["compression", "decompression", "constant"],
)
def test_schreiner_vs_solve_ivp(segment, gas):
    """Schreiner equals scipy.integrate.solve_ivp on the same ODE within 1e-6 bar."""
    t, a, b = segment
    half = C16.n2_half if gas == "n2" else C16.he_half
    f = 0.79 if gas == "n2" else 0.84
    p0 = 0.75 if gas == "n2" else 0.1
    got = tissue_tensions([t], [a], [b], [f], half, p0)[0]
    ref = _ode_reference([t], [a], [b], [f], half, p0)[0]
    np.testing.assert_allclose(got, ref, atol=1e-6, rtol=0)


def test_multi_segment_profile_vs_solve_ivp():
    """A whole dive (descent, bottom, stops, ascent, zero-length switch) against solve_ivp."""
    minutes = [1.33, 28.67, 2.0, 0.0, 3.0, 0.33, 10.0, 0.33]
    p_s = [1.013, 4.084, 4.084, 2.24, 2.24, 2.24, 1.93, 1.93]
    p_e = [4.084, 4.084, 2.24, 2.24, 2.24, 1.93, 1.93, 1.013]
    f = [0.79, 0.79, 0.79, 0.0, 0.0, 0.0, 0.0, 0.0]
    got = tissue_tensions(minutes, p_s, p_e, f, C16.n2_half, 0.7509)
    ref = _ode_reference(minutes, p_s, p_e, f, C16.n2_half, 0.7509)
    np.testing.assert_allclose(got, ref, atol=1e-6, rtol=0)


@pytest.mark.parametrize(("n_half", "fraction"), [(1, 0.5), (2, 0.75), (4, 0.9375), (6, 0.984375)])
def test_half_time_saturation_fractions(n_half, fraction):
    """After n half-times a compartment has taken up 1 - 2^-n of the step (Haldane equation;
    the same fractions are quoted in decompression-theory texts: 50 %, 93.75 %, 98.4 %)."""
    half = np.array([10.0])
    p = tissue_tensions([n_half * 10.0], [5.0], [5.0], [1.0], half, 0.0, ph2o_bar=0.0)[0, 0]
    assert p / 5.0 == pytest.approx(fraction, abs=1e-12)


def test_compression_regression_values():
    """Compression 1.01325 -> 4.000 bar at 2 bar/min from air saturation (Q 0.79, PH2O 0.0627).

    Regression values computed for this check (not published): 1.031521 (4 min),
    0.979159 (5 min), 0.795592 (27 min); they agree with solve_ivp (test above).
    """
    p0 = (1.01325 - PH2O) * 0.79
    t = (4.0 - 1.01325) / 2.0
    got = tissue_tensions([t], [1.01325], [4.0], [0.79], [4.0, 5.0, 27.0], p0)[0]
    np.testing.assert_allclose(got, [1.031521, 0.979159, 0.795592], atol=1e-6)


def test_vector_equals_scalar():
    """The batch scan equals a plain loop of the closed-form Schreiner equation."""
    rng = np.random.default_rng(7)
    n = 200
    t = rng.uniform(0, 3, n)
    t[::17] = 0.0
    p = np.concatenate([[1.01325], 1.01325 + rng.uniform(0, 6, n)])
    f = rng.choice([0.79, 0.68, 0.0], n)
    half = C16.n2_half
    k = rate_constant(half)
    got = tissue_tensions(t, p[:-1], p[1:], f, half, 0.75)
    y = np.full(half.shape, 0.75)
    for i in range(n):
        pa0 = inspired_pressure(p[i], f[i])
        r = (inspired_pressure(p[i + 1], f[i]) - pa0) / t[i] if t[i] > 0 else 0.0
        y = schreiner(y, pa0, r, t[i], k)
        # the scan sums exponentially weighted terms: agreement to rounding, 1e-9 bar
        np.testing.assert_allclose(got[i], y, atol=1e-9, rtol=0)


def test_batch_equals_single_profiles():
    """Profiles computed as a batch equal each profile computed alone."""
    rng = np.random.default_rng(3)
    t = rng.uniform(0, 2, (4, 50))
    p = 1.01325 + rng.uniform(0, 5, (4, 51))
    f = np.full((4, 50), 0.79)
    batch = tissue_tensions(t, p[:, :-1], p[:, 1:], f, C16.n2_half, 0.75)
    for b in range(4):
        one = tissue_tensions(t[b], p[b, :-1], p[b, 1:], f[b], C16.n2_half, 0.75)
        np.testing.assert_allclose(batch[b], one, atol=1e-12)


def test_long_profile_block_boundaries_exact():
    """A 24-hour profile sampled every second crosses scan blocks without losing accuracy."""
    n = 24 * 3600
    t = np.full(n, 1.0 / 60.0)
    depth = 2.0 + 1.5 * np.sin(np.linspace(0, 40, n + 1))
    p = 1.01325 + depth
    got = final_tensions(t, p[:-1], p[1:], 0.84, C16.he_half, 0.0)
    k = rate_constant(C16.he_half)
    y = np.zeros_like(k)
    # reference: loop in blocks of the closed form (same equation, no scan)
    pa = inspired_pressure(p, 0.84)
    r = (pa[1:] - pa[:-1]) / t
    for i in range(n):
        y = schreiner(y, pa[i], r[i], t[i], k)
    np.testing.assert_allclose(got, y, atol=1e-9)


def test_zero_length_segments_change_nothing():
    got = tissue_tensions([0.0, 0.0], [3.0, 3.0], [3.0, 3.0], [0.79, 0.79], C16.n2_half, 0.9)
    np.testing.assert_allclose(got, 0.9)


def test_saturation_limit():
    """After a very long time at constant depth every compartment equals the inspired pressure."""
    got = final_tensions([100000.0], [3.0], [3.0], [0.79], C16.n2_half, 0.75)
    np.testing.assert_allclose(got, (3.0 - PH2O) * 0.79, rtol=1e-12)


def test_surface_saturation_value():
    """Surface-saturated N2 tension with air: (1.01325 - 0.0627) * 0.79 = 0.75093 bar
    (regression value computed for this check)."""
    np.testing.assert_allclose(saturated_tensions(1.01325, 0.79, 16), 0.7509345, atol=1e-7)


@pytest.mark.parametrize(
    "kwargs",
    [
        {"minutes": [-1.0]},
        {"minutes": [np.nan]},
        {"half_time_min": [0.0]},
    ],
)
def test_bad_input_raises(kwargs):
    args = {
        "minutes": [1.0],
        "p_start_bar": [1.0],
        "p_end_bar": [2.0],
        "f_inert": [0.79],
        "half_time_min": [5.0],
        "p_tissue0_bar": 0.75,
    }
    args.update(kwargs)
    with pytest.raises(InputError):
        tissue_tensions(**args)


def test_no_gas_breathed_and_none_in_the_tissues_stays_zero():
    """Helium on an air dive: exactly zero everywhere (dP/dt = k (0 - 0)), any batch shape."""
    t = np.full((3, 5), 2.0)
    p = np.linspace(1.0, 4.0, 15).reshape(3, 5)
    got = tissue_tensions(t, p, p, 0.0, [5.0, 10.0], 0.0)
    assert got.shape == (3, 5, 2) and not got.any()
    # any helium in the tissues or the gas is integrated as before
    assert tissue_tensions(t, p, p, 0.0, [5.0, 10.0], 0.1).all()
