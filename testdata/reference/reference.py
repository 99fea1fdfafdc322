#!/usr/bin/env python3
"""Independent reference solution of pvcouple's model with SciPy.

Reads a JSON document with "circulation" ("held" or "closed") and "params"
(the keys of `pvcouple params`) on stdin, as `pvcouple solve --format json`
prints it; everything else in the input is ignored. It integrates the model
with scipy.integrate.solve_ivp (DOP853, tight tolerances, every valve opening
and closing a terminal event), repeats beats one after another until the
start-of-beat state stops changing (plain repetition, not pvcouple's Newton
shooting), measures the last beat and prints params, metrics and timing as
JSON. Metrics that a circulation does not have are null.

    go build -o /tmp/pvcouple . &&
    /tmp/pvcouple solve --preset normal --circulation closed --format json |
        /usr/bin/python3 testdata/reference/reference.py

The equations, written from docs/science.md:

  activation (§1, §10): double-Hill set B, n1 = 1.32, n2 = 21.9,
      a1 = 0.708 t_peak, a2 = 1.677 a1, t_peak = 0.8 (0.546 - 0.0021 HR) s,
      the relaxation factor's end-of-beat value subtracted (Mynard 2012),
      scaled numerically to a peak of exactly 1
  ventricles (§1): P = e Ees (V - V0) + (1 - e) A (exp(B (V - V0)) - 1)
  arteries (§2): P_sa = (V_sa - Vu_sa)/C, P_ao = P_sa + Zc Q_aortic,
      Q_aortic = (P_lv - P_sa)/(R_av + Zc) while the valve is open
  held (§2): LV fills from the filling pressure through the mitral valve,
      the arteries drain through R to the venous pressure
  closed (§9): vessels P = (V - Vu)/C with Vu 600 / 2500 / 90 / 400 mL
      (systemic arteries / veins / pulmonary arteries / veins); atria
      P = (Emin + ea (Emax - Emin)) (V - 4 mL); flows through R (systemic),
      R_vr/(1 - occlusion) (venous return), tricuspid 0.005, pulmonary valve
      0.003, R_p (pulmonary), 0.015 (pulmonary veins to LA, no valve), R_mv;
      atrial activation ea(t) = f(t + PR) + f(t - (T - PR)), half-cosine f
      over Ta = 0.2 sqrt(T) s
  valves: one-way, open while the pressure across them is positive.
  lesions (§11): the open mitral and aortic valves add a Bernoulli orifice
      loss k Q^2 with k = (rho/2)(1/A^2 - 1/A_normal^2), rho = 1.06 g/mL,
      A_normal 6 (mitral) and 4 cm^2 (aortic), to their linear resistance;
      a shut valve with a regurgitant orifice of area A_r passes the reverse
      flow of r Q + (rho/2)/A_r^2 Q|Q| = dP, r its open resistance (with Zc for
      the aortic valve), so it is never isovolumic.
  pump (§12): LV to systemic arteries, Q = Q0 (1 - (P_sa - P_lv)/H0).
  balloon (§12): a volume Vb(t) inside the systemic arteries, P_sa =
      (V_sa + Vb - Vu)/C, filling over 50 ms (half cosine) from the first
      aortic valve closure after an opening in the beat (or, when the valve
      does not open, from where the activation falls to one half after its
      peak) and emptying over the last 50 ms of the beat; at 1:2 every other
      beat, so the steady state repeats over two beats.

Measurements (model/metrics.go defines them; computed here on the beat's own
1 kHz samples plus the left-heart valve events, as a catheter would record
them; time means and the loop area are integrals carried by the ODE):
end-diastole is the largest volume up to mitral closure (the end of forward
mitral flow) before peak dP/dt, end-systole the sample of largest
P/(V - V0) above a floor, SV = largest volume from end-diastole to
end-systole - smallest volume (the volume ejected), PE and PVA
after Suga, VO2 by the per-100 g relation of Khalafbeigui, Suga & Sagawa 1979,
Weiss tau, Grossman's meridional wall stress. The valve and device
measurements (model/metrics_devices.go) come from integrals over the open or
shut phases of the valves: mean gradients over the time of forward flow,
backflow through the shut valves, net aortic and pump flow; the peak aortic
gradient and the diastolic pressures from the samples.
"""
import json
import math
import sys
import time

import numpy as np
import scipy
from scipy import integrate, optimize, stats

# Double-Hill set B (docs/science.md §1) and Weissler's QS2 (§10).
HILL_N1, HILL_N2, HILL_A1, HILL_A2 = 1.32, 21.9, 0.708, 1.677
# Unstressed volumes (docs/science.md §9), mL.
VU = {"sa": 600.0, "sv": 2500.0, "pa": 90.0, "pv": 400.0, "atrium": 4.0}
# Fixed resistances of the closed circulation (docs/science.md §9), mmHg s/mL.
R_TRICUSPID, R_PULMONIC, R_PV_LA = 0.005, 0.003, 0.015
# Integration tolerances of the reference.
RTOL, ATOL = 1e-11, 1e-10
# Longest step, s: while a ventricle's valves are shut its volume stands still
# and the error control alone would step over a brief valve opening.
MAX_STEP = 0.004
# Orifices (docs/science.md §11): blood density g/cm^3, dyn/cm^2 per mmHg, and
# the normal valve areas (cm^2) at which a valve has no stenosis.
RHO, MMHG = 1.06, 1333.22
NORMAL_AREA = {"mitral": 6.0, "aortic": 4.0}
# Balloon (docs/science.md §12): fill and empty times, s.
BALLOON_RAMP = 0.05
# The lesion and device parameters and their values when there is none.
DEVICES_OFF = {"aortic_valve_area_cm2": 4.0, "aortic_regurgitant_area_cm2": 0.0, "mitral_valve_area_cm2": 6.0,
               "mitral_regurgitant_area_cm2": 0.0, "pump_flow_l_per_min": 0.0, "pump_head_mmhg": 150.0,
               "balloon_volume_ml": 0.0, "balloon_ratio": 1.0}


def bernoulli(area):
    """k of dP = k Q^2 for an orifice of area cm^2, mmHg/(mL/s)^2."""
    return RHO / (2.0 * MMHG * area ** 2)


def series_flow(dp, r, k):
    """The flow Q with r Q + k Q|Q| = dp (quadratic formula)."""
    if k == 0.0:
        return dp / r
    return math.copysign((math.sqrt(r * r + 4.0 * k * abs(dp)) - r) / (2.0 * k), dp)


class Ventricular:
    """The normalised ventricular elastance e(t) over one beat."""

    def __init__(self, hr):
        self.period = 60.0 / hr
        tpeak = 0.8 * (0.546 - 0.0021 * hr)
        self.a1 = HILL_A1 * tpeak
        self.a2 = HILL_A2 * self.a1
        self.tail = 1.0 / (1.0 + (self.period / self.a2) ** HILL_N2)
        self.scale = 1.0
        # The single maximum is where the derivative vanishes.
        tmax = optimize.brentq(lambda t: self.value_and_rate(t)[1], 1e-4 * self.period, self.period,
                               xtol=1e-15)
        self.scale = 1.0 / self.value_and_rate(tmax)[0]

    def value_and_rate(self, t):
        if t <= 0.0:
            return 0.0, 0.0
        u = (t / self.a1) ** HILL_N1
        w = (t / self.a2) ** HILL_N2
        rise = u / (1.0 + u)
        fall = 1.0 / (1.0 + w) - self.tail
        drise = HILL_N1 * u / (t * (1.0 + u) ** 2)
        dfall = -HILL_N2 * w / (t * (1.0 + w) ** 2)
        return self.scale * rise * fall, self.scale * (drise * fall + rise * dfall)


class Atrial:
    """The atrial activation ea(t): two half-cosine twitches, one begun PR
    before this beat and one PR before the next."""

    def __init__(self, hr, pr_ms):
        self.period = 60.0 / hr
        self.pr = pr_ms / 1000.0
        self.ta = 0.2 * math.sqrt(self.period)
        self.onsets = (-self.pr, self.period - self.pr)

    def twitch(self, s):
        ta = self.ta
        if s <= 0.0 or s >= ta:
            return 0.0
        if s < 2.0 * ta / 3.0:
            return 0.5 * (1.0 - math.cos(1.5 * math.pi * s / ta))
        return 0.5 * (1.0 + math.cos(3.0 * math.pi * s / ta - 2.0 * math.pi))

    def value(self, t):
        return sum(self.twitch(t - on) for on in self.onsets)

    def active(self, t):
        return any(0.0 < t - on < self.ta for on in self.onsets)

    def kinks(self):
        """Times within the beat where ea is not smooth: onsets, peaks, ends."""
        out = []
        for on in self.onsets:
            for s in (0.0, 2.0 * self.ta / 3.0, self.ta):
                if 0.0 < on + s < self.period:
                    out.append(on + s)
        return sorted(out)


def chamber(e, v, ees, v0, a, b):
    """Ventricular pressure and its partial derivatives in e and V."""
    x = v - v0
    passive = a * math.expm1(b * x)
    active = ees * x
    return (e * active + (1.0 - e) * passive, active - passive,
            e * ees + (1.0 - e) * a * b * math.exp(b * x))


class Circuit:
    """The model of one circulation. State: compartment volumes (mL), then
    integrals carried over the beat for the measurements."""

    def __init__(self, circulation, p):
        if circulation not in ("held", "closed"):
            raise SystemExit(f"reference: circulation {circulation!r}: want held or closed")
        self.closed = circulation == "closed"
        p = dict(DEVICES_OFF, **p)
        self.p = p
        self.vent = Ventricular(p["heart_rate_bpm"])
        self.period = self.vent.period
        self.lv = (p["ees_mmhg_per_ml"], p["v0_ml"], p["edpvr_a_mmhg"], p["edpvr_b_per_ml"])
        self.r_aortic = p["aortic_resistance_mmhg_s_per_ml"] + p["zc_mmhg_s_per_ml"]
        r_mitral = p["mitral_resistance_mmhg_s_per_ml"]

        def lesion(kind, area, leak):
            narrow = 0.0
            if area < NORMAL_AREA[kind]:
                narrow = bernoulli(area) - bernoulli(NORMAL_AREA[kind])
            return narrow, (bernoulli(leak) if leak > 0.0 else None)

        # Each valve: upstream, downstream, open resistance, stenosis k, and
        # the k of its regurgitant orifice (None for a competent valve).
        mitral = ("la", "lv", r_mitral) + lesion("mitral", p["mitral_valve_area_cm2"],
                                                 p["mitral_regurgitant_area_cm2"])
        aortic = ("lv", "sa", self.r_aortic) + lesion("aortic", p["aortic_valve_area_cm2"],
                                                      p["aortic_regurgitant_area_cm2"])
        self.q0 = p["pump_flow_l_per_min"] * 1000.0 / 60.0
        self.h0 = p["pump_head_mmhg"]
        self.balloon = p["balloon_volume_ml"]
        self.ratio = int(p["balloon_ratio"])
        if self.ratio not in (1, 2):
            raise SystemExit(f"reference: balloon_ratio {p['balloon_ratio']}: want 1 or 2")
        # Where the activation has fallen to one half after its peak.
        tmax = optimize.minimize_scalar(lambda t: -self.vent.value_and_rate(t)[0],
                                        bounds=(0.2 * self.period, 0.8 * self.period), method="bounded",
                                        options={"xatol": 1e-12}).x
        self.relax = optimize.brentq(lambda t: self.vent.value_and_rate(t)[0] - 0.5, tmax, self.period, xtol=1e-15)
        self.onset = None  # balloon inflation onset in the current beat
        if self.closed:
            self.atrial = Atrial(p["heart_rate_bpm"], p["pr_interval_ms"])
            self.rv = (p["rv_ees_mmhg_per_ml"], p["rv_v0_ml"], p["rv_edpvr_a_mmhg"], p["rv_edpvr_b_per_ml"])
            self.r_return = p["venous_return_resistance_mmhg_s_per_ml"] / (1.0 - p["caval_occlusion_pct"] / 100.0)
            self.names = ["lv", "sa", "sv", "ra", "rv", "pa", "pv", "la"]
            self.valves = [mitral, aortic, ("ra", "rv", R_TRICUSPID, 0.0, None), ("rv", "pa", R_PULMONIC, 0.0, None)]
        else:
            self.names = ["lv", "sa"]
            self.valves = [mitral, aortic]
        self.n = len(self.names)
        # Integrals: P_ao, P_la, P_ra, P_pa, forward mitral inflow and the part
        # of it while the atria contract, the LV's external work P (Q_out -
        # Q_in - Q_pump), LV - aortic pressure and time while the aortic valve
        # is open, LA - LV pressure and time while the mitral valve is open,
        # backflow through the shut mitral and aortic valves, aortic valve flow,
        # pump flow.
        self.integrals = ["pao", "pla", "pra", "ppa", "qin", "qin_atrial", "work", "g_av", "t_av", "g_mv", "t_mv",
                          "back_mv", "back_av", "q_av", "q_pump"]

    def unstressed(self):
        p = self.p
        return {"lv": p["v0_ml"], "sa": VU["sa"], "sv": VU["sv"], "ra": VU["atrium"], "rv": p["rv_v0_ml"],
                "pa": VU["pa"], "pv": VU["pv"], "la": VU["atrium"]}

    def balloon_volume(self, t):
        if self.onset is None or t <= self.onset:
            return 0.0
        v = self.balloon
        up = (t - self.onset) / BALLOON_RAMP
        if up < 1.0:
            v *= 0.5 - 0.5 * math.cos(math.pi * up)
        down = (self.period - t) / BALLOON_RAMP
        if down < 1.0:
            v *= 0.5 - 0.5 * math.cos(math.pi * max(down, 0.0))
        return v

    def pressures(self, t, y):
        p = self.p
        e, de = self.vent.value_and_rate(t)
        P = {}
        plv, dpde, dpdv = chamber(e, y[0], *self.lv)
        P["lv"] = plv
        P["sa"] = (y[1] + self.balloon_volume(t) - VU["sa"]) / p["compliance_ml_per_mmhg"]
        if self.closed:
            ea = self.atrial.value(t)
            atrial_e = p["atrial_emin_mmhg_per_ml"] + ea * (p["atrial_emax_mmhg_per_ml"] - p["atrial_emin_mmhg_per_ml"])
            P["sv"] = (y[2] - VU["sv"]) / p["venous_compliance_ml_per_mmhg"]
            P["ra"] = atrial_e * (y[3] - VU["atrium"])
            P["rv"] = chamber(e, y[4], *self.rv)[0]
            P["pa"] = (y[5] - VU["pa"]) / p["pulmonary_compliance_ml_per_mmhg"]
            P["pv"] = (y[6] - VU["pv"]) / p["pulmonary_venous_compliance_ml_per_mmhg"]
            P["la"] = atrial_e * (y[7] - VU["atrium"])
        else:
            P["sv"] = p["venous_pressure_mmhg"]
            P["la"] = p["filling_pressure_mmhg"]
        return P, (de, dpde, dpdv)

    def valve_flows(self, P, open_):
        out = []
        for (a, b, r, k, leak), o in zip(self.valves, open_):
            dp = P[a] - P[b]
            if o:
                out.append(series_flow(dp, r, k))
            elif leak is not None:
                out.append(series_flow(dp, r, leak))
            else:
                out.append(0.0)
        return out

    def pump_flow(self, P):
        return self.q0 * (1.0 - (P["sa"] - P["lv"]) / self.h0) if self.q0 > 0.0 else 0.0

    def derivative(self, t, y, open_, atrial_window, with_integrals):
        p = self.p
        P, _ = self.pressures(t, y)
        q = self.valve_flows(P, open_)
        q_mitral, q_aortic = q[0], q[1]
        q_pump = self.pump_flow(P)
        q_systemic = (P["sa"] - P["sv"]) / p["resistance_mmhg_s_per_ml"]
        if self.closed:
            q_return = (P["sv"] - P["ra"]) / self.r_return
            q_tricuspid, q_pulmonic = q[2], q[3]
            q_lungs = (P["pa"] - P["pv"]) / p["pulmonary_resistance_mmhg_s_per_ml"]
            q_veins_la = (P["pv"] - P["la"]) / R_PV_LA
            dv = [q_mitral - q_aortic - q_pump, q_aortic + q_pump - q_systemic, q_systemic - q_return,
                  q_return - q_tricuspid, q_tricuspid - q_pulmonic, q_pulmonic - q_lungs, q_lungs - q_veins_la,
                  q_veins_la - q_mitral]
        else:
            dv = [q_mitral - q_aortic - q_pump, q_aortic + q_pump - q_systemic]
        if not with_integrals:
            return dv
        pao = P["sa"] + p["zc_mmhg_s_per_ml"] * q_aortic
        mv_open, av_open = open_[0], open_[1]
        inflow = q_mitral if mv_open else 0.0
        return dv + [pao, P["la"], P.get("ra", 0.0), P.get("pa", 0.0), inflow,
                     inflow if atrial_window else 0.0, P["lv"] * (q_aortic + q_pump - q_mitral),
                     P["lv"] - pao if av_open else 0.0, 1.0 if av_open else 0.0,
                     P["la"] - P["lv"] if mv_open else 0.0, 1.0 if mv_open else 0.0,
                     0.0 if mv_open else -q_mitral, 0.0 if av_open else -q_aortic, q_aortic, q_pump]

    def beat(self, start, keep=False, rtol=RTOL, atol=ATOL, inflate=True):
        """Integrates one beat from the start volumes (the balloon, if any,
        inflating when inflate is set). Returns the end volumes, the
        integrals, and (keep) the segments, valve events and the start of
        diastole."""
        period = self.period
        y = np.concatenate([np.asarray(start, float), np.zeros(len(self.integrals) if keep else 0)])
        atols = np.full(len(y), atol)
        self.onset = None
        P, _ = self.pressures(0.0, y)
        open_ = [P[a] > P[b] for a, b, *_ in self.valves]
        fixed = (self.atrial.kinks() if self.closed else []) + [period]
        balloon = self.balloon > 0.0 and inflate
        if balloon:
            fixed.append(period - BALLOON_RAMP)
            if self.relax < period:
                fixed.append(self.relax)
        t, segments, events = 0.0, [], []
        opened, diastole = False, None
        switches = 0
        while t < period:
            stops = [s for s in fixed if s > t + 1e-12]
            if self.onset is not None and self.onset + BALLOON_RAMP > t + 1e-12:
                stops.append(self.onset + BALLOON_RAMP)
            stop = min(stops)
            # The atrial window opens and shuts only at the kinks, so the middle
            # of a piece tells whether it lies inside.
            window = self.closed and self.atrial.active(0.5 * (t + stop))
            fns = []
            for i, (a, b, *_) in enumerate(self.valves):
                def g(t, y, a=a, b=b):
                    P, _ = self.pressures(t, y)
                    return P[a] - P[b]
                g.terminal = True
                g.direction = -1 if open_[i] else 1
                fns.append(g)
            state = list(open_)
            sol = integrate.solve_ivp(lambda t, y: self.derivative(t, y, state, window, keep), (t, stop), y,
                                      method="DOP853", rtol=rtol, atol=atols, events=fns, dense_output=keep,
                                      max_step=MAX_STEP)
            if not sol.success:
                raise SystemExit("reference: " + sol.message)
            if keep:
                segments.append((sol.t[0], sol.t[-1], sol.sol, state))
            y, t = sol.y[:, -1], sol.t[-1]
            if sol.status == 1:
                switches += 1
                if switches > 40:
                    raise SystemExit("reference: valves switched too often in one beat")
                hits = [(te[0], i) for i, te in enumerate(sol.t_events) if len(te)]
                _, i = min(hits)
                open_[i] = not open_[i]
                events.append((t, i, open_[i]))
                if i == 1 and open_[1]:
                    opened = True
                if i == 1 and not open_[1] and opened and diastole is None:
                    diastole = t
            else:
                t = stop
                if balloon and diastole is None and not opened and not open_[1] and abs(t - self.relax) < 1e-12:
                    diastole = t
            if diastole is not None and balloon and self.onset is None:
                self.onset = diastole
        if diastole is None:
            diastole = self.relax
        return y[:self.n], y[self.n:], segments, events, diastole

    def cycle(self, start, rtol, atol):
        """One period of the steady state: one beat, or at 1:2 a beat without
        the balloon and one with it."""
        if self.balloon > 0.0 and self.ratio == 2:
            start = self.beat(start, rtol=rtol, atol=atol, inflate=False)[0]
        return self.beat(start, rtol=rtol, atol=atol)[0]

    def initial(self):
        """A start state: the LV filled to the filling pressure, the other
        compartments at rough resting pressures, the systemic veins holding the
        rest of the stressed volume."""
        p = self.p
        fill = p["filling_pressure_mmhg"]
        lv = p["v0_ml"] + math.log1p(fill / p["edpvr_a_mmhg"]) / p["edpvr_b_per_ml"]
        sa = VU["sa"] + p["compliance_ml_per_mmhg"] * 80.0
        if not self.closed:
            return [lv, sa]
        u = self.unstressed()
        x = {"lv": lv, "sa": sa,
             "ra": u["ra"] + 4.0 / p["atrial_emin_mmhg_per_ml"],
             "rv": p["rv_v0_ml"] + math.log1p(4.0 / p["rv_edpvr_a_mmhg"]) / p["rv_edpvr_b_per_ml"],
             "pa": VU["pa"] + 15.0 * p["pulmonary_compliance_ml_per_mmhg"],
             "pv": VU["pv"] + (fill + 2.0) * p["pulmonary_venous_compliance_ml_per_mmhg"],
             "la": u["la"] + fill / p["atrial_emin_mmhg_per_ml"]}
        x["sv"] = p["stressed_volume_ml"] + sum(u.values()) - sum(x.values())
        return [x[k] for k in self.names]


def steady(circ, tol=1e-10, max_beats=3000):
    """Repeats cycles of beats until the start state changes by less than tol
    (relative, floor 10 mL) and the geometric tail of the remaining changes,
    estimated from the ratio of successive changes, is below tol too (or the
    change is a hundredth of tol, in the rounding noise). A looser integration
    brings the state near; the tight one finishes."""
    y = np.array(circ.initial())
    beats, last = 0, None
    per_cycle = 2 if circ.balloon > 0.0 and circ.ratio == 2 else 1
    for rtol, goal in ((1e-8, 1e-7), (RTOL, tol)):
        last = None
        while True:
            beats += per_cycle
            if beats > max_beats:
                raise SystemExit(f"reference: no steady state after {max_beats} beats")
            y1 = circ.cycle(y, rtol, ATOL if rtol == RTOL else 1e-7)
            change = float(np.max(np.abs(y1 - y) / np.maximum(np.abs(y), 10.0)))
            y = y1
            if not np.all(np.isfinite(y)):
                raise SystemExit("reference: the state left the finite numbers")
            ratio = change / last if last else 1.0
            last = change
            tail = change * ratio / (1.0 - ratio) if ratio < 1.0 else math.inf
            if change < goal and (tail < goal or change < 0.01 * goal):
                break
    return y, beats, change


def sample_grid(period, events, diastole):
    """The 1 kHz grid of a beat with the left heart's valve events and the
    start of diastole merged in."""
    ts = list(np.arange(0.0, period - 1e-9, 1e-3)) + [period]
    for t in [t for t, i, _ in events if i < 2] + [diastole]:
        if 0.0 < t < period and min(abs(t - s) for s in ts) > 1e-9:
            ts.append(t)
    return np.array(sorted(ts))


def evaluate(segments, ts, n):
    """Volumes and valve states at the times ts from the segments' dense output."""
    vs, states = np.empty((len(ts), n)), []
    k = 0
    for j, t in enumerate(ts):
        while k < len(segments) - 1 and t > segments[k][1]:
            k += 1
        a, b, f, state = segments[k]
        vs[j] = f(min(max(t, a), b))[:n]
        states.append(state)
    return vs, states


def measure(circ, integrals, segments, events, diastole, lap_mean):
    p, period = circ.p, circ.period
    ts = sample_grid(period, events, diastole)
    vs, states = evaluate(segments, ts, circ.n)
    ees, v0, A, B = circ.lv
    plv, dpdt, pao, grad, qin = (np.empty(len(ts)) for _ in range(5))
    for j, t in enumerate(ts):
        P, (de, dpde, dpdv) = circ.pressures(t, vs[j])
        q = circ.valve_flows(P, states[j])
        plv[j] = P["lv"]
        dpdt[j] = dpde * de + dpdv * (q[0] - q[1] - circ.pump_flow(P))
        pao[j] = P["sa"] + p["zc_mmhg_s_per_ml"] * q[1]
        grad[j] = plv[j] - pao[j] if q[1] > 0.0 else -math.inf
        qin[j] = q[0]
    v = vs[:, 0]

    i_rise = int(np.argmax(dpdt))
    upto = i_rise if i_rise > 0 else len(ts) - 1
    # The mitral valve closes at end-diastole: the sample after the last of
    # forward mitral flow before the upstroke (the first when none).
    forward = np.nonzero(qin[:upto] > 0.0)[0]
    upto = int(forward[-1]) + 1 if len(forward) else 0
    i_ed = int(np.argmax(v[:upto + 1]))
    edv, edp = v[i_ed], plv[i_ed]
    floor = max(1.0, 0.02 * (edv - v0))
    elastance = np.full(len(ts), -np.inf)
    ok = v - v0 > floor
    elastance[ok] = plv[ok] / (v[ok] - v0)
    i_es = int(np.argmax(elastance))
    esv, esp = v[i_es], plv[i_es]
    sv = float(v[i_ed:i_es + 1].max()) - float(v.min()) if i_es >= i_ed else edv - float(v.min())
    ea = esp / sv
    r_total = p["resistance_mmhg_s_per_ml"] + p["zc_mmhg_s_per_ml"]

    I = dict(zip(circ.integrals, integrals))
    sw = I["work"]
    x_es = esv - v0
    pe = 0.5 * esp * x_es - (A * math.expm1(B * x_es) / B - A * x_es if x_es > 0 else 0.0)
    pva = sw + pe
    mass = 1.05 * p["wall_volume_ml"]
    vo2_100g = 1.75e-5 * pva * 100.0 / mass + 0.031
    vo2 = vo2_100g * mass / 100.0

    i_fall = int(np.argmin(dpdt))
    fit = []
    for j in range(i_fall, len(ts)):
        if not (plv[j] > edp + 5.0 and plv[j] > 0.0):
            break
        fit.append(j)
    tau = math.nan
    if len(fit) >= 3:
        slope = stats.linregress(ts[fit], np.log(plv[fit])).slope
        tau = -1000.0 / slope if slope < 0 else math.nan

    def wall_stress(pr, vol):
        r = (3.0 * vol / (4.0 * math.pi)) ** (1.0 / 3.0)
        h = (3.0 * (vol + p["wall_volume_ml"]) / (4.0 * math.pi)) ** (1.0 / 3.0) - r
        return 1.332 * pr * r / (2.0 * h * (1.0 + h / (2.0 * r)))

    back = I["back_mv"] + I["back_av"]
    per_min = 60.0 / period / 1000.0
    in_diastole = ts >= diastole - 1e-9
    m = {
        "edv_ml": edv, "esv_ml": esv, "sv_ml": sv, "ef_pct": 100.0 * sv / edv, "edp_mmhg": edp,
        "esp_mmhg": esp, "ea_mmhg_per_ml": ea, "ees_mmhg_per_ml": ees, "ea_ees_ratio": ea / ees,
        "ea_hr_r_mmhg_per_ml": r_total / period,
        "ea_segers_mmhg_per_ml": -0.13 + 1.02 * r_total / period + 0.31 / p["compliance_ml_per_mmhg"],
        "hr_bpm": 60.0 / period, "co_l_per_min": sv * 60.0 / period / 1000.0,
        "map_mmhg": I["pao"] / period, "sbp_mmhg": float(pao.max()), "dbp_mmhg": float(pao.min()),
        "sw_mmhg_ml": sw, "pe_mmhg_ml": pe, "pva_mmhg_ml": pva, "efficiency": sw / pva,
        "vo2_ml_per_beat": vo2, "vo2_ml_per_beat_100g": vo2_100g,
        "mechanical_efficiency": sw * 1.333e-4 / (vo2 * 20.0),
        "dpdt_max_mmhg_per_s": float(dpdt.max()), "dpdt_min_mmhg_per_s": float(dpdt.min()), "tau_ms": tau,
        "ed_wall_stress_kdyn_cm2": wall_stress(edp, edv), "es_wall_stress_kdyn_cm2": wall_stress(esp, esv),
        "lap_mean_mmhg": lap_mean,
        "atrial_filling_pct": math.nan, "cvp_mmhg": math.nan, "pap_mean_mmhg": math.nan, "rv_sv_ml": math.nan,
        "av_mean_gradient_mmhg": I["g_av"] / I["t_av"] if I["t_av"] > 0 else math.nan,
        "av_peak_gradient_mmhg": float(grad.max()) if I["t_av"] > 0 else math.nan,
        "mv_mean_gradient_mmhg": I["g_mv"] / I["t_mv"] if I["t_mv"] > 0 else math.nan,
        "regurgitant_volume_ml": back, "regurgitant_fraction_pct": 100.0 * back / sv,
        "forward_sv_ml": I["q_av"], "total_sv_ml": sv, "av_open_ms": 1000.0 * I["t_av"],
        "pump_co_l_per_min": I["q_pump"] * per_min, "total_co_l_per_min": (I["q_av"] + I["q_pump"]) * per_min,
        "diastolic_augmentation_mmhg": float(pao[in_diastole].max() - pao[in_diastole][0]),
        "aortic_edp_mmhg": float(pao[-1]),
    }
    if circ.closed:
        # The RV's extremes fall on its valve events (zero flow there), so
        # those times join the grid for its stroke volume.
        extra = np.array(sorted(t for t, i, _ in events if i >= 2))
        rv = np.concatenate([vs[:, 4], evaluate(segments, extra, circ.n)[0][:, 4] if len(extra) else []])
        m.update({"atrial_filling_pct": 100.0 * I["qin_atrial"] / I["qin"], "cvp_mmhg": I["pra"] / period,
                  "pap_mean_mmhg": I["ppa"] / period, "rv_sv_ml": float(rv.max() - rv.min())})
    return m


def solve(doc, tol=1e-10):
    """The steady state and metrics of the input document."""
    circulation = doc.get("circulation")
    if circulation is None:
        raise SystemExit("reference: the input has no circulation (held or closed)")
    p = doc["params"]
    start_clock = time.perf_counter()
    circ = Circuit(circulation, p)
    start, beats, change = steady(circ, tol)
    first = start
    lap_first = None
    if circ.balloon > 0.0 and circ.ratio == 2:
        # The first beat of the cycle rests; the second, with the balloon, is
        # the one measured. Mean LAP is over the whole cycle.
        first, integ = circ.beat(start, keep=True, inflate=False)[:2]
        lap_first = dict(zip(circ.integrals, integ))["pla"]
        beats += 1
    end, integrals, segments, events, diastole = circ.beat(first, keep=True)
    beats += 1
    drift = abs(float(np.sum(end) - np.sum(start))) / float(np.sum(start))
    if drift > 1e-9:
        raise SystemExit(f"reference: blood volume changed by {drift:.2g} (relative) over a beat")
    lap = dict(zip(circ.integrals, integrals))["pla"] / circ.period
    if lap_first is not None:
        lap = 0.5 * (lap + lap_first / circ.period)
    metrics = measure(circ, integrals, segments, events, diastole, lap)
    elapsed = (time.perf_counter() - start_clock) * 1000.0
    return {
        "scenario": doc.get("scenario"), "circulation": circulation, "params": p,
        "metrics": {k: (None if not math.isfinite(v) else float(v)) for k, v in metrics.items()},
        "timing": {"solve_ms": elapsed, "beats": beats},
        "steady": {"last_change": change, "volume_drift": drift,
                   "start_ml": dict(zip(circ.names, map(float, start)))},
        "generator": "testdata/reference/reference.py, SciPy " + scipy.__version__,
    }


def main():
    json.dump(solve(json.load(sys.stdin)), sys.stdout, indent=2)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
