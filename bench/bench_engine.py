"""Engine throughput: Schreiner tissue kinetics, in one run, against same-run references.

Work 1: an 8-hour profile sampled every second (28,800 segments), 16 compartments,
N2 and He.  Work 2: a batch of 1,000 one-hour profiles sampled every 10 s
(360 segments each), 16 compartments, N2 and He.

References measured in the same run on the same work:

* ``solve_ivp``: scipy's DOP853 on dP/dt = k (P_alv(t) - P) per segment (timed on a
  leading slice and scaled per segment, since the full run takes minutes);
* Python loop: a plain per-step loop of the closed-form Schreiner update over the
  16-vector of compartments (timed on a slice for work 2 and scaled);
* streaming bound: one bare numpy pass of the Schreiner closed form over arrays of
  the same size, given every segment's start tension (no recurrence): the least
  work any exact method must do.

Targets: >= 100x faster than solve_ivp, >= 30x faster than the loop, within 3x of
the streaming bound.  Run: ``.venv/bin/python bench/bench_engine.py``.
"""

from __future__ import annotations

import time

import numpy as np
from scipy.integrate import solve_ivp

from supervisor.engine.buhlmann import load_coefficients
from supervisor.engine.kinetics import inspired_pressure, rate_constant, schreiner, tissue_tensions

C = load_coefficients("zhl16c")
PH2O = 0.0627


def best(fn, repeat=5):
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def engine(t, p1, p2, fn2, fhe):
    a = tissue_tensions(t, p1, p2, fn2, C.n2_half, 0.75, PH2O)
    b = tissue_tensions(t, p1, p2, fhe, C.he_half, 0.0, PH2O)
    return a, b


def streaming(t, p1, p2, fn2, fhe, p0n, p0h, chunk=2048):
    """One in-place pass of the closed form from known start tensions (no recurrence),
    over the same cache-sized pieces as the engine (groups of profiles, blocks of
    segments): the practical bound."""
    n = t.shape[-1]
    rows = t.reshape(-1, n).shape[0]
    t2, a2, b2 = t.reshape(rows, n), p1.reshape(rows, n), p2.reshape(rows, n)
    group = max(1, chunk // n)
    out = []
    for f, half, p0 in ((fn2.reshape(rows, n), C.n2_half, p0n), (fhe.reshape(rows, n),
                                                                 C.he_half, p0h)):
        k = rate_constant(half)
        inv_k = 1.0 / k
        res = np.empty((rows, n, 16))
        for g in range(0, rows, group):
            for s in range(0, n, chunk):
                sl = (slice(g, g + group), slice(s, min(n, s + chunk)))
                tt = t2[sl][..., None]
                pa = (a2[sl][..., None] - PH2O) * f[sl][..., None]
                r = (b2[sl][..., None] - a2[sl][..., None]) * f[sl][..., None] / tt
                d = np.exp(-k * tt)  # the one exponential per element
                blk = res[sl]
                np.subtract(p0, pa, out=blk)
                blk += r * inv_k
                blk *= d
                blk += pa
                blk += r * (tt - inv_k)
        out.append(res)
    return out


def python_loop(t, p1, p2, fn2, fhe):
    kn, kh = rate_constant(C.n2_half), rate_constant(C.he_half)
    yn, yh = np.full(16, 0.75), np.zeros(16)
    for i in range(t.shape[0]):
        pa = inspired_pressure(p1[i], fn2[i], PH2O)
        ra = (inspired_pressure(p2[i], fn2[i], PH2O) - pa) / t[i]
        yn = schreiner(yn, pa, ra, t[i], kn)
        ph = inspired_pressure(p1[i], fhe[i], PH2O)
        rh = (inspired_pressure(p2[i], fhe[i], PH2O) - ph) / t[i]
        yh = schreiner(yh, ph, rh, t[i], kh)
    return yn, yh


def ivp(t, p1, p2, fn2, fhe):
    k = np.concatenate([rate_constant(C.n2_half), rate_constant(C.he_half)])
    y = np.concatenate([np.full(16, 0.75), np.zeros(16)])
    for i in range(t.shape[0]):
        f = np.concatenate([np.full(16, fn2[i]), np.full(16, fhe[i])])

        def rhs(tt, yy, i=i, f=f):
            pamb = p1[i] + (p2[i] - p1[i]) * tt / t[i]
            return k * ((pamb - PH2O) * f - yy)

        y = solve_ivp(rhs, (0, t[i]), y, method="DOP853", rtol=1e-9, atol=1e-9).y[:, -1]
    return y


def profile(n, dt, rng):
    tt = np.arange(n + 1) * dt
    depth_bar = 2.5 + 2.0 * np.sin(tt / 37.0) + 0.05 * rng.standard_normal(n + 1)
    p = 1.01325 + np.clip(depth_bar, 0, None)
    return np.full(n, dt), p[:-1], p[1:], np.full(n, 0.30), np.full(n, 0.50)


def report(name, n_seg, t_engine, t_stream, t_loop, t_ivp):
    work = n_seg * 32
    print(f"\n{name}: {n_seg:,} segments x 32 compartment-gases = {work:,} updates")
    rate = work / t_engine / 1e6
    print(f"  engine           {t_engine * 1e3:9.2f} ms  ({rate:7.1f} M updates/s)")
    print(f"  streaming bound  {t_stream * 1e3:9.2f} ms  engine/bound = {t_engine / t_stream:5.2f}x"
          "  (target <= 3)")
    print(f"  python loop      {t_loop * 1e3:9.2f} ms  loop/engine  = {t_loop / t_engine:7.0f}x"
          "  (target >= 30)")
    print(f"  solve_ivp        {t_ivp * 1e3:9.0f} ms  ivp/engine   = {t_ivp / t_engine:7.0f}x"
          "  (target >= 100)")


def main() -> None:
    rng = np.random.default_rng(0)
    # work 1: 8 h at 1 s
    n = 8 * 3600
    w1 = profile(n, 1 / 60, rng)
    p0n, p0h = np.full(16, 0.75), np.zeros(16)
    t_e = best(lambda: engine(*w1))
    t_s = best(lambda: streaming(*w1, p0n, p0h))
    t_l = best(lambda: python_loop(*w1), repeat=2)
    m = 400
    t_i = best(lambda: ivp(*(a[:m] for a in w1)), repeat=1) * n / m
    report("8-hour profile, 1 s sampling", n, t_e, t_s, t_l, t_i)

    # work 2: 1,000 one-hour profiles at 10 s
    b, n2 = 1000, 360
    prof = [profile(n2, 10 / 60, rng) for _ in range(b)]
    w2 = tuple(np.stack([p[j] for p in prof]) for j in range(5))
    t_e = best(lambda: engine(*w2))
    t_s = best(lambda: streaming(*w2, p0n, p0h))
    sub = 20
    t_l = best(lambda: [python_loop(*(a[i] for a in w2)) for i in range(sub)], repeat=2) * b / sub
    t_i = best(lambda: ivp(*(a[0, :m] for a in w2)), repeat=1) * (b * n2) / m
    report("batch of 1,000 one-hour profiles, 10 s sampling", b * n2, t_e, t_s, t_l, t_i)
    print("\nsolve_ivp and the loop on work 2 are timed on a slice and scaled per segment.")


if __name__ == "__main__":
    main()
