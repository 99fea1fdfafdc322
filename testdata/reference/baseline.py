#!/usr/bin/env python3
"""Like-for-like SciPy baseline of pvcouple's steady-state solve, for timing.

Run (the input is what `pvcouple solve --format json` prints; only
"circulation" and "params" are read):

    go build -o /tmp/pvcouple . &&
    /tmp/pvcouple solve --preset normal --circulation closed --format json |
        /usr/bin/python3 testdata/reference/baseline.py --repeat 9

It prints the median wall time of one cold solve (ms) over the repeats, the
beats the shooting took (as pvcouple's Steady.Beats) and a few metrics of the
final beat. Compare with
`go test ./model -run '^$' -bench 'SteadyState(Closed)?Cold$'` run on the same
machine at the same time.

What it does is what model.Solver.SteadyState does from a cold start, written
with SciPy: the same equations (model/circuit.go, docs/science.md §1, §2, §9,
§10; the ventricular activation by its formula, where pvcouple interpolates a
table of 1024 Hermite knots, which moves its numbers by about 1e-8), the same
valve events with the same hysteresis (terminal events of solve_ivp: a valve
switches when its driving pressure passes 1e-3 mmHg on the far side from its
state), the same step cap while a ventricle's valves are shut, pressures
cached for the events at the end of each step, the same cold guess, and the
same shooting: Newton on the beat map G(z) = F(z) - z over the LV and arterial
volumes (held) or all volumes but the systemic veins' (closed), a
forward-difference Jacobian with steps max(1e-4, sqrt(rtol)) max(|z|, 10),
Broyden updates, steps limited to half of max(|z|, 20), halving until the
residual does not double, a rebuilt Jacobian when no halving does, residual
max |G|/max(|z|, 10) below 1e-6. Its tolerance schedule is pvcouple's too: the
first beat and every beat taken while the residual is above 0.05 at pvcouple's
loose tolerance (rtol 1e-5), the others at its tight one (1e-7), and the
search ends only on a tight beat (a residual below 1e-6 on a loose beat has
the same state integrated again, tightly). Here each of the two levels is a
SciPy method and rtol of the same accuracy (below), and sqrt(rtol) in the
Jacobian step is pvcouple's rtol of the level. The final beat is sampled at
1 kHz (integrated once more with dense output, which is faster in SciPy than
dense output on every beat; --dense-every-beat does that instead). On the
normal preset it takes the same beats as pvcouple (4 held, 11 closed; the same
on the other presets but for three held ones, where its residual falls below
1e-6 a beat sooner). Unlike reference.py it copies pvcouple's method, so it
checks nothing; it says how fast that method runs in SciPy.

Tolerances for the same accuracy. pvcouple integrates with Dormand-Prince
5(4) at rtol 1e-5 (loose) or 1e-7 (tight), atol = 10 rtol. The error of one
beat map from pvcouple's steady start, max |F - F_ref|/max(|F_ref|, 10)
against DOP853 at rtol 1e-13, is printed by

    /tmp/pvcouple loop --preset NAME --circulation MODE --format json |
        /usr/bin/python3 testdata/reference/baseline.py --accuracy

for pvcouple's tight level and SciPy's methods at several rtols (atol = 10
rtol as in pvcouple). For the loose level the input is the same command's
output from a build with relTol = 1e-5 and absTol = 1e-4 in model/beat.go
(every beat then loose), with --go-rtol 1e-5 to label it. The worst error
over the seven presets (SciPy 1.10), method rtol: error:
  held, loose:    pvcouple 1e-5: 9.9e-6; RK45 3e-6: 6.1e-6, 1e-5: 1.1e-5;
                  DOP853 3e-6: 3.9e-6, 1e-5: 6.3e-5
  held, tight:    pvcouple 1e-7: 5.5e-7; RK45 1e-7: 5.3e-7, 3e-7: 3.4e-6;
                  DOP853 3e-7: 3.1e-7, 1e-6: 9.7e-7
  closed, loose:  pvcouple 1e-5: 2.0e-5; RK45 3e-6: 9.4e-6, 1e-5: 2.2e-5;
                  DOP853 3e-7: 6.7e-7, 1e-6: 1.4e-4, 3e-6: 2.2e-4, 1e-5: 2.2e-5
  closed, tight:  pvcouple 1e-7: 1.8e-6; RK45 3e-8: 5.4e-7, 1e-7: 2.1e-6;
                  DOP853 3e-7: 6.7e-7, 1e-6: 1.4e-4
DOP853's error does not fall steadily with rtol, hence the worst case. Of
these, the defaults are the fastest pair that is no less accurate than
pvcouple at each level (timed as whole cold solves of the normal preset, all
four pairings): RK45 at 3e-6 for the loose beats and DOP853 at 3e-7 for the
tight ones, in both circulations (--loose and --tight choose others).

Timing. On a 2-core machine shared with other work (load average 1.5-2.2),
six interleaved rounds of `go test ./model -run '^$' -bench
'SteadyState(Closed)?Cold$' -benchtime 500x -count 5` and of this script
(--repeat 9, each circulation), normal preset, Go 1.26, SciPy 1.10, Python
3.11; median (min) of one cold solve:
  held:   pvcouple 0.185 ms (0.167), 4 beats; SciPy 20.8 ms (19.8), 4 beats:
          112 times slower (119 by minima)
  closed: pvcouple 1.07 ms (0.97), 11 beats; SciPy 116 ms (107), 11 beats:
          108 times slower (111 by minima)
"""
import argparse
import json
import math
import statistics
import sys
import time

import numpy as np
from scipy import integrate, optimize

N1, N2 = 1.32, 21.9
VU_SA, VU_SV, VU_PA, VU_PV, V0_ATRIUM = 600.0, 2500.0, 90.0, 400.0, 4.0
R_TV, R_PV, R_PVLA = 0.005, 0.003, 0.015
STEADY_TOL, MAX_BEATS = 1e-6, 60
ISOVOLUMIC_MAX_STEP = 0.05  # of the time to peak elastance
HYSTERESIS = 1e-3  # mmHg past zero for a valve to switch

# pvcouple's two tolerance levels and when it uses the loose one.
GO_RTOL = {"loose": 1e-5, "tight": 1e-7}
LOOSE_BELOW = 0.05
ATOL_PER_RTOL = 10.0  # pvcouple's ratio: atol 1e-6 at rtol 1e-7

# SciPy's method and rtol at each level, chosen with --accuracy (see the
# module comment).
TOLS = {"held": {"loose": ("RK45", 3e-6), "tight": ("DOP853", 3e-7)},
        "closed": {"loose": ("RK45", 3e-6), "tight": ("DOP853", 3e-7)}}


class BeatError(RuntimeError):
    """A beat that could not be integrated."""


class Model:
    """pvcouple's circuit of one circulation (model/circuit.go)."""

    def __init__(self, circulation, p):
        self.closed = circulation == "closed"
        self.p = p
        hr = p["heart_rate_bpm"]
        self.period = 60.0 / hr
        self.tpeak = 0.8 * (0.546 - 0.0021 * hr)
        self.a1 = 0.708 * self.tpeak
        self.a2 = 1.677 * self.a1
        self.c = 1.0 / (1.0 + (self.period / self.a2) ** N2)
        self.k = 1.0
        peak = optimize.brentq(lambda t: self.act(t)[1], 1e-3 * self.period, self.period, xtol=1e-14)
        self.k = 1.0 / self.act(peak)[0]
        self.ta = min(0.2 * math.sqrt(self.period), self.period)
        self.pr = p.get("pr_interval_ms", 0.0) / 1000.0
        self.rvr = p.get("venous_return_resistance_mmhg_s_per_ml", 1.0) / (1 - p.get("caval_occlusion_pct", 0.0) / 100)
        self.cache_t, self.cache_y, self.cache_p = None, None, None
        self.nv = 4 if self.closed else 2
        self.dim = 9 if self.closed else 2
        self.unknowns = [0, 1, 3, 4, 5, 6, 7] if self.closed else [0, 1]
        self.unstressed = (p["v0_ml"] + VU_SA + VU_SV + V0_ATRIUM + p.get("rv_v0_ml", 0.0) + VU_PA + VU_PV
                           + V0_ATRIUM)

    def act(self, t):
        if t <= 0:
            return 0.0, 0.0
        g1 = (t / self.a1) ** N1
        g2 = (t / self.a2) ** N2
        h1, r2 = g1 / (1 + g1), 1 / (1 + g2)
        h2 = r2 - self.c
        return self.k * h1 * h2, self.k * (N1 * h1 * (1 - h1) / t * h2 - h1 * N2 * g2 * r2 * r2 / t)

    def twitch(self, s):
        if s <= 0 or s >= self.ta:
            return 0.0
        if s < 2 * self.ta / 3:
            return 0.5 * (1 - math.cos(1.5 * math.pi * s / self.ta))
        return 0.5 * (1 + math.cos(3 * math.pi * s / self.ta - 2 * math.pi))

    def atrial(self, t):
        return self.twitch(t + self.pr) + self.twitch(t - (self.period - self.pr))

    def pressures(self, t, y):
        p = self.p
        e = self.act(t)[0]
        x = y[0] - p["v0_ml"]
        plv = e * p["ees_mmhg_per_ml"] * x + (1 - e) * p["edpvr_a_mmhg"] * math.expm1(p["edpvr_b_per_ml"] * x)
        psa = (y[1] - VU_SA) / p["compliance_ml_per_mmhg"]
        if not self.closed:
            return plv, psa, p["venous_pressure_mmhg"], 0.0, 0.0, 0.0, 0.0, p["filling_pressure_mmhg"]
        ea = self.atrial(t)
        el = p["atrial_emin_mmhg_per_ml"] + ea * (p["atrial_emax_mmhg_per_ml"] - p["atrial_emin_mmhg_per_ml"])
        xr = y[4] - p["rv_v0_ml"]
        prv = (e * p["rv_ees_mmhg_per_ml"] * xr
               + (1 - e) * p["rv_edpvr_a_mmhg"] * math.expm1(p["rv_edpvr_b_per_ml"] * xr))
        return (plv, psa, (y[2] - VU_SV) / p["venous_compliance_ml_per_mmhg"], el * (y[3] - V0_ATRIUM), prv,
                (y[5] - VU_PA) / p["pulmonary_compliance_ml_per_mmhg"],
                (y[6] - VU_PV) / p["pulmonary_venous_compliance_ml_per_mmhg"], el * (y[7] - V0_ATRIUM))

    def drives(self, P):
        return (P[7] - P[0], P[0] - P[1], P[3] - P[4], P[4] - P[5])

    def cached(self, t, y):
        """The pressures at (t, y), kept for the last y: the events are
        evaluated at the end of each step, where the last stage of the step
        has just evaluated them (pvcouple caches them the same way)."""
        if y is not self.cache_y or t != self.cache_t:
            self.cache_t, self.cache_y, self.cache_p = t, y, self.pressures(t, y)
        return self.cache_p

    def rhs(self, t, y, opened):
        p = self.p
        P = self.cached(t, y)
        mv = (P[7] - P[0]) / p["mitral_resistance_mmhg_s_per_ml"] if opened[0] else 0.0
        av = (P[0] - P[1]) / (p["aortic_resistance_mmhg_s_per_ml"] + p["zc_mmhg_s_per_ml"]) if opened[1] else 0.0
        qs = (P[1] - P[2]) / p["resistance_mmhg_s_per_ml"]
        if not self.closed:
            return [mv - av, av - qs]
        qv = (P[2] - P[3]) / self.rvr
        tv = (P[3] - P[4]) / R_TV if opened[2] else 0.0
        pv = (P[4] - P[5]) / R_PV if opened[3] else 0.0
        qp = (P[5] - P[6]) / p["pulmonary_resistance_mmhg_s_per_ml"]
        ql = (P[6] - P[7]) / R_PVLA
        return [mv - av, av - qs, qs - qv, qv - tv, tv - pv, pv - qp, qp - ql, ql - mv, P[7]]

    def beat(self, x, method, rtol, atol, dense=False):
        """One beat from the volumes x; returns the end volumes, mean LAP and
        (dense) the segments (t0, t1, interpolant, valves). A valve starts
        open where its driving pressure is positive and switches when that
        pressure passes the hysteresis band on the far side from its state."""
        y = np.zeros(self.dim)
        y[:len(x)] = x
        opened = [d > 0 for d in self.drives(self.pressures(0.0, y))[:self.nv]]
        t, first, segments = 0.0, None, []
        for _ in range(41):
            events = []
            for i in range(self.nv):
                band = HYSTERESIS if opened[i] else -HYSTERESIS

                def g(t, y, i=i, band=band):
                    return self.drives(self.cached(t, y))[i] + band
                g.terminal, g.direction = True, (-1 if opened[i] else 1)
                events.append(g)
            shut = not (opened[0] or opened[1]) or (self.closed and not (opened[2] or opened[3]))
            state = list(opened)
            sol = integrate.solve_ivp(lambda t, y: self.rhs(t, y, state), (t, self.period), y, method=method,
                                      rtol=rtol, atol=atol, events=events, dense_output=dense,
                                      first_step=None if first is None else min(first, self.period - t),
                                      max_step=ISOVOLUMIC_MAX_STEP * self.tpeak if shut else np.inf)
            if not sol.success:
                raise BeatError(sol.message)
            if dense:
                segments.append((t, sol.t[-1], sol.sol, state))
            if len(sol.t) > 2:
                first = sol.t[-2] - sol.t[-3]
            y, t = sol.y[:, -1], sol.t[-1]
            if sol.status != 1:
                break
            hit = min((te[0], i) for i, te in enumerate(sol.t_events) if len(te))[1]
            opened[hit] = not opened[hit]
        else:
            raise BeatError("valves switched too often")
        if not np.all(np.isfinite(y)):
            raise BeatError("state is not finite")
        lap = y[8] / self.period if self.closed else self.p["filling_pressure_mmhg"]
        return y[:8] if self.closed else y[:2], lap, segments

    def cold_guess(self):
        """pvcouple's start-of-beat estimate (model/coldguess.go)."""
        p = self.p
        T = self.period
        ea = (p["resistance_mmhg_s_per_ml"] + p["zc_mmhg_s_per_ml"]) / T
        if not self.closed:
            edv = p["v0_ml"] + math.log1p(p["filling_pressure_mmhg"] / p["edpvr_a_mmhg"]) / p["edpvr_b_per_ml"]
            sv = max(0.0, (edv - p["v0_ml"]) * p["ees_mmhg_per_ml"] / (p["ees_mmhg_per_ml"] + ea))
            q = math.exp(-T / (p["resistance_mmhg_s_per_ml"] * p["compliance_ml_per_mmhg"]))
            return [edv, VU_SA + p["compliance_ml_per_mmhg"] * (p["venous_pressure_mmhg"]
                                                              + sv / p["compliance_ml_per_mmhg"] * q / (1 - q))]
        el = p["atrial_emin_mmhg_per_ml"] + self.atrial(0.0) * (p["atrial_emax_mmhg_per_ml"]
                                                                 - p["atrial_emin_mmhg_per_ml"])

        def at(lap):
            edv = p["v0_ml"] + math.log1p(lap / p["edpvr_a_mmhg"]) / p["edpvr_b_per_ml"]
            sv = max(1.0, (edv - p["v0_ml"]) * p["ees_mmhg_per_ml"] / (p["ees_mmhg_per_ml"] + ea))
            q = sv / T
            ppv = lap + q * R_PVLA
            ppa = ppv + q * p["pulmonary_resistance_mmhg_s_per_ml"]
            edv_rv = p["rv_v0_ml"] + 1.2 * ppa / p["rv_ees_mmhg_per_ml"] + sv
            pra = max(0.5, p["rv_edpvr_a_mmhg"] * math.expm1(p["rv_edpvr_b_per_ml"] * (edv_rv - p["rv_v0_ml"])))
            psv = pra + q * self.rvr
            psa = psv + q * p["resistance_mmhg_s_per_ml"]

            def diastolic(mean, downstream, r, c):
                k = math.exp(-T / (r * c))
                return min(downstream + sv / c * k / (1 - k), mean)
            c_sa, c_pa = p["compliance_ml_per_mmhg"], p["pulmonary_compliance_ml_per_mmhg"]
            x = [edv, VU_SA + c_sa * diastolic(psa, psv, p["resistance_mmhg_s_per_ml"], c_sa),
                 VU_SV + p["venous_compliance_ml_per_mmhg"] * psv, V0_ATRIUM + pra / el, edv_rv,
                 VU_PA + c_pa * diastolic(ppa, ppv, p["pulmonary_resistance_mmhg_s_per_ml"], c_pa),
                 VU_PV + p["pulmonary_venous_compliance_ml_per_mmhg"] * ppv, V0_ATRIUM + lap / el]
            return x, sum(x) - self.unstressed

        lo, hi = 0.5, 60.0
        for _ in range(50):
            mid = 0.5 * (lo + hi)
            if at(mid)[1] < p["stressed_volume_ml"]:
                lo = mid
            else:
                hi = mid
        return at(0.5 * (lo + hi))[0]

    def state(self, z):
        if not self.closed:
            return list(z)
        x = [0.0] * 8
        for i, c in enumerate(self.unknowns):
            x[c] = z[i]
        x[2] = self.p["stressed_volume_ml"] + self.unstressed - sum(z)
        return x


def steady_state(m, tols, dense=True):
    """Newton-Broyden shooting on the beat map from a cold start, as
    model.Solver.SteadyState; tols maps pvcouple's tolerance levels ("loose",
    "tight") to SciPy's (method, rtol)."""
    beats, level = 0, "loose"

    def residual(z):
        nonlocal beats
        if beats >= MAX_BEATS:
            raise RuntimeError("beat cap reached")
        beats += 1
        method, rtol = tols[level]
        end, lap, segments = m.beat(m.state(z), method, rtol, ATOL_PER_RTOL * rtol, dense)
        return np.array([end[c] for c in m.unknowns]) - z, (m.state(z), end, lap, segments)

    def norm(r, z):
        return float(np.max(np.abs(r) / np.maximum(np.abs(z), 10.0)))

    z = np.array([m.cold_guess()[c] for c in m.unknowns])
    r, last = residual(z)
    res, jac, n = norm(r, z), None, len(z)
    while res >= STEADY_TOL or level != "tight":
        if beats >= MAX_BEATS:
            raise RuntimeError("beat cap reached")
        if res < STEADY_TOL:
            # Converged on loose beats: check on a tight one.
            level = "tight"
            r, last = residual(z)
            res = norm(r, z)
            continue
        if jac is None:
            jac = np.empty((n, n))
            for j in range(n):
                zp = z.copy()
                h = max(1e-4, math.sqrt(GO_RTOL[level])) * max(abs(z[j]), 10.0)
                zp[j] += h
                jac[:, j] = (residual(zp)[0] - r) / h
        level = "loose" if res > LOOSE_BELOW else "tight"
        deficient = False
        try:
            dz = np.linalg.solve(jac, -r)
        except np.linalg.LinAlgError:
            dz, deficient = np.linalg.lstsq(jac, -r, rcond=1e-9)[0], True
        dz /= max(1.0, float(np.max(np.abs(dz) / (0.5 * np.maximum(np.abs(z), 20.0)))))
        lam, accepted, failed = 1.0, False, False
        while lam > 1.0 / 64 and beats < MAX_BEATS:
            zn = z + lam * dz
            try:
                rn, lastn = residual(zn)
            except BeatError:
                failed, lam = True, lam / 2
                continue
            failed = False
            resn = norm(rn, zn)
            if resn < 2 * res or resn < STEADY_TOL:
                accepted = True
                break
            lam /= 2
        if not accepted:
            if failed or beats >= MAX_BEATS:
                raise RuntimeError("no step reduced the residual")
            # The Jacobian misled the step: rebuild it where it stands.
            r, last = residual(z)
            jac = None
            continue
        step, dr = zn - z, rn - r
        jac += np.outer(dr - jac @ step, step) / float(step @ step)
        if deficient:
            jac = None
        z, r, res, last = zn, rn, resn, lastn
    return last, beats, res


def sample(m, last, dt=1e-3):
    """The final beat at 1 kHz and a few of its measurements."""
    _, _, lap, segments = last
    p = m.p
    ts = np.append(np.arange(0.0, m.period - 1e-9, dt), m.period)
    ys = np.empty((len(ts), m.dim))
    for t0, t1, f, _ in segments:
        sel = (ts >= t0) & (ts <= t1)
        if sel.any():
            ys[sel] = f(ts[sel]).T
    v = ys[:, 0]
    e = np.array([m.act(t)[0] for t in ts])
    x = v - p["v0_ml"]
    plv = e * p["ees_mmhg_per_ml"] * x + (1 - e) * p["edpvr_a_mmhg"] * np.expm1(p["edpvr_b_per_ml"] * x)
    psa = (ys[:, 1] - VU_SA) / p["compliance_ml_per_mmhg"]
    pao = psa + p["zc_mmhg_s_per_ml"] * np.maximum(plv - psa, 0) / (p["aortic_resistance_mmhg_s_per_ml"]
                                                                     + p["zc_mmhg_s_per_ml"])
    edv = float(v.max())
    return {"edv_ml": edv, "sv_ml": edv - float(v.min()), "map_mmhg": float(integrate.trapezoid(pao, ts) / m.period),
            "sbp_mmhg": float(pao.max()), "dbp_mmhg": float(pao.min()), "lap_mean_mmhg": lap}


def solve(doc, tols, dense=False):
    """One cold solve and the final beat's samples. Without dense output on
    every beat, the final beat (a tight one) is integrated once more with it."""
    m = Model(doc["circulation"], doc["params"])
    last, beats, res = steady_state(m, tols, dense)
    if not dense:
        method, rtol = tols["tight"]
        end, lap, segments = m.beat(last[0], method, rtol, ATOL_PER_RTOL * rtol, True)
        last = (last[0], end, lap, segments)
    return sample(m, last), beats, res


def loop_ends(doc):
    """The first and last volumes of the beat `pvcouple loop --format json`
    prints: pvcouple's steady start x and its beat map F(x). Held, the arterial
    volume follows from the aortic pressure where the valve is shut."""
    smp = doc["samples"]
    if doc["circulation"] == "closed":
        cols = ["v_lv_ml", "v_sa_ml", "v_sv_ml", "v_ra_ml", "v_rv_ml", "v_pa_ml", "v_pv_ml", "v_la_ml"]
        return [smp[c][0] for c in cols], [smp[c][-1] for c in cols]
    if smp["q_out_ml_s"][0] != 0 or smp["q_out_ml_s"][-1] != 0:
        raise SystemExit("baseline: the beat starts or ends with the aortic valve open")
    c = doc["params"]["compliance_ml_per_mmhg"]
    return ([smp["v_lv_ml"][0], VU_SA + c * smp["p_ao_mmhg"][0]],
            [smp["v_lv_ml"][-1], VU_SA + c * smp["p_ao_mmhg"][-1]])


ACCURACY_RTOLS = (1e-4, 3e-5, 1e-5, 3e-6, 1e-6, 3e-7, 1e-7, 3e-8, 1e-8, 3e-9, 1e-9)


def accuracy(doc, go_rtol):
    """Errors of one beat map, max |F - F_ref|/max(|F_ref|, 10) with F_ref from
    DOP853 at rtol 1e-13, from pvcouple's steady start (input: `pvcouple loop
    --format json`): pvcouple's own (its printed end of the beat, integrated
    at go_rtol) and SciPy's at several methods and tolerances."""
    m = Model(doc["circulation"], doc["params"])
    x, go_end = loop_ends(doc)
    ref, _, _ = m.beat(x, "DOP853", 1e-13, ATOL_PER_RTOL * 1e-13)

    def err(end):
        return float(np.max(np.abs(np.asarray(end) - ref) / np.maximum(np.abs(ref), 10.0)))

    rows = [{"method": "pvcouple", "rtol": go_rtol, "error": err(go_end)}]
    for method in ("RK45", "DOP853"):
        for rtol in ACCURACY_RTOLS:
            end = m.beat(x, method, rtol, ATOL_PER_RTOL * rtol)[0]
            rows.append({"method": method, "rtol": rtol, "error": err(end)})
    return rows


def method_rtol(text):
    """METHOD:RTOL of a command-line option."""
    method, _, rtol = text.partition(":")
    if method not in ("RK45", "DOP853", "RK23") or not rtol:
        raise argparse.ArgumentTypeError("want METHOD:RTOL with METHOD RK45, DOP853 or RK23, got %r" % text)
    return method, float(rtol)


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--repeat", type=int, default=5, help="cold solves to time (median reported)")
    for level in ("loose", "tight"):
        ap.add_argument("--" + level, type=method_rtol, metavar="METHOD:RTOL",
                        help="SciPy's method and rtol for pvcouple's %s beats (default: %s)" % (
                            level, ", ".join("%s:%g %s" % (t[level] + (c,)) for c, t in TOLS.items())))
    ap.add_argument("--accuracy", action="store_true", help="print beat-map errors instead of timing")
    ap.add_argument("--go-rtol", type=float, default=GO_RTOL["tight"],
                    help="with --accuracy: the rtol pvcouple's input beat was integrated at (a label)")
    ap.add_argument("--dense-every-beat", action="store_true",
                    help="dense output on every beat, as pvcouple records it, instead of one more integration "
                         "of the final beat with it (DOP853's dense output costs three more evaluations a step)")
    args = ap.parse_args()
    doc = json.load(sys.stdin)
    if args.accuracy:
        for row in accuracy(doc, args.go_rtol):
            print("%-8s rtol %-6g beat-map error %.2e" % (row["method"], row["rtol"], row["error"]))
        return
    tols = dict(TOLS[doc["circulation"]])
    for level in ("loose", "tight"):
        if getattr(args, level) is not None:
            tols[level] = getattr(args, level)
    times = []
    for _ in range(args.repeat):
        clock = time.perf_counter()
        metrics, beats, res = solve(doc, tols, args.dense_every_beat)
        times.append(1000 * (time.perf_counter() - clock))
    out = {"circulation": doc["circulation"],
           "levels": {k: {"method": m, "rtol": r, "atol": ATOL_PER_RTOL * r} for k, (m, r) in tols.items()},
           "dense_every_beat": args.dense_every_beat,
           "median_ms": statistics.median(times), "times_ms": times, "beats": beats, "residual": res,
           "metrics": metrics}
    json.dump(out, sys.stdout, indent=2)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
