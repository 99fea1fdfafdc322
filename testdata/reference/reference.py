#!/usr/bin/env python3
"""Independent reference solution of pvcouple's model with SciPy.

Reads the JSON printed by `pvcouple solve --format json` on stdin, integrates
the same equations with scipy.integrate.solve_ivp (DOP853, tight tolerances,
valve openings and closings as terminal events), runs beats one after another
until the start-of-beat state repeats (plain repetition, not pvcouple's
Newton shooting), measures the last beat with numpy/scipy and prints the same
JSON shape: params, metrics, timing.

Equations (see model/doc.go and docs/science.md):
  e(t)  double-Hill, Stergiopulos et al. 1996 set B, Mynard et al. 2012 end
        correction, normalised numerically to peak 1; peak elastance at
        t_peak = 0.8*QS2, QS2 = 0.546 - 0.0021*HR s (Weissler et al. 1968)
  P_lv  = e*Ees*(V-V0) + (1-e)*A*(exp(B*(V-V0))-1)
  Q_in  = (P_la - P_lv)/R_mv   while the mitral valve is open
  Q_out = (P_lv - P_c)/(R_av + Zc) while the aortic valve is open
  dV/dt = Q_in - Q_out;  C dP_c/dt = Q_out - (P_c - P_v)/R;  P_ao = P_c + Zc*Q_out
"""
import json
import math
import sys
import time

import numpy as np
from scipy import integrate, optimize, stats

N1, N2 = 1.32, 21.9


class Activation:
    def __init__(self, hr):
        self.period = 60.0 / hr
        tpeak = 0.8 * (0.546 - 0.0021 * hr)
        self.a1 = 0.708 * tpeak
        self.a2 = 1.677 * self.a1
        self.c = 1.0 / (1.0 + (self.period / self.a2) ** N2)
        self.k = 1.0
        res = optimize.minimize_scalar(lambda t: -self.e(t), bounds=(1e-6, self.period),
                                       method="bounded", options={"xatol": 1e-12})
        self.k = 1.0 / self.e(res.x)

    def e(self, t):
        if t <= 0:
            return 0.0
        g1 = (t / self.a1) ** N1
        g2 = (t / self.a2) ** N2
        return self.k * g1 / (1 + g1) * (1 / (1 + g2) - self.c)

    def de(self, t, h=1e-7):
        return (self.e(t + h) - self.e(max(t - h, 0.0))) / (t + h - max(t - h, 0.0))


class Model:
    def __init__(self, p):
        self.p = p
        self.act = Activation(p["heart_rate_bpm"])

    def plv(self, t, v):
        p = self.p
        x = v - p["v0_ml"]
        e = self.act.e(t)
        return e * p["ees_mmhg_per_ml"] * x + (1 - e) * p["edpvr_a_mmhg"] * math.expm1(p["edpvr_b_per_ml"] * x)

    def rhs(self, t, y, mitral, aortic):
        p = self.p
        v, pc = y
        plv = self.plv(t, v)
        qin = (p["filling_pressure_mmhg"] - plv) / p["mitral_resistance_mmhg_s_per_ml"] if mitral else 0.0
        qout = (plv - pc) / (p["aortic_resistance_mmhg_s_per_ml"] + p["zc_mmhg_s_per_ml"]) if aortic else 0.0
        return [qin - qout, (qout - (pc - p["venous_pressure_mmhg"]) / p["resistance_mmhg_s_per_ml"])
                / p["compliance_ml_per_mmhg"]]

    def beat(self, y0, keep=False):
        """Integrates one beat from y0; returns the end state and, if keep, the segments."""
        p = self.p
        period = self.act.period
        y = np.array(y0, dtype=float)
        plv0 = self.plv(0.0, y[0])
        mitral = p["filling_pressure_mmhg"] > plv0
        aortic = plv0 > y[1]
        t, segments, events = 0.0, [], {}
        for _ in range(40):
            def g_mitral(t, y):
                return p["filling_pressure_mmhg"] - self.plv(t, y[0])

            def g_aortic(t, y):
                return self.plv(t, y[0]) - y[1]

            g_mitral.terminal = g_aortic.terminal = True
            g_mitral.direction = -1 if mitral else 1
            g_aortic.direction = -1 if aortic else 1
            def f(t, y, mitral=mitral, aortic=aortic):
                return self.rhs(t, y, mitral, aortic)

            sol = integrate.solve_ivp(f, (t, period), y, method="DOP853", rtol=1e-11, atol=1e-10,
                                      max_step=0.004, events=[g_mitral, g_aortic],
                                      dense_output=keep)
            if not sol.success:
                raise RuntimeError(sol.message)
            if keep:
                segments.append((sol.t[0], sol.t[-1], sol.sol))
            y = sol.y[:, -1]
            t = sol.t[-1]
            if sol.status == 1:
                hit = [i for i, te in enumerate(sol.t_events) if len(te)]
                i = min(hit, key=lambda i: sol.t_events[i][0])
                if i == 0:
                    mitral = not mitral
                    events.setdefault("mitral_open" if mitral else "mitral_close", t)
                else:
                    aortic = not aortic
                    events.setdefault("aortic_open" if aortic else "aortic_close", t)
            if t >= period - 1e-12:
                return y, segments, events
        raise RuntimeError("valves switched too often in one beat")


def measure(model, segments, events):
    """The measurements of a beat, defined as in model/metrics.go, computed here independently."""
    p, act = model.p, model.act
    period = act.period
    ts = np.arange(0.0, period + 1e-12, 1e-3)
    ts[-1] = period
    extra = [v for v in events.values() if 0 < v < period]
    ts = np.unique(np.concatenate([ts, extra]))
    keep = np.concatenate([[True], np.diff(ts) > 1e-9])
    ts = ts[keep]
    vs, pcs = np.empty_like(ts), np.empty_like(ts)
    for i, t in enumerate(ts):
        for (a, b, f) in segments:
            if a <= t <= b:
                vs[i], pcs[i] = f(t)
                break
    v0 = p["v0_ml"]
    e = np.array([act.e(t) for t in ts])
    de = np.array([act.de(t) for t in ts])
    x = vs - v0
    A, B, ees = p["edpvr_a_mmhg"], p["edpvr_b_per_ml"], p["ees_mmhg_per_ml"]
    plv = e * ees * x + (1 - e) * A * np.expm1(B * x)
    qin = np.maximum(0, (p["filling_pressure_mmhg"] - plv) / p["mitral_resistance_mmhg_s_per_ml"])
    qout = np.maximum(0, (plv - pcs) / (p["aortic_resistance_mmhg_s_per_ml"] + p["zc_mmhg_s_per_ml"]))
    pao = pcs + p["zc_mmhg_s_per_ml"] * qout
    dpdv = e * ees + (1 - e) * A * B * np.exp(B * x)
    dpdt = de * (ees * x - A * np.expm1(B * x)) + dpdv * (qin - qout)

    imax = int(np.argmax(dpdt))
    last = imax if imax > 0 else len(ts) - 1
    ied = int(np.argmax(vs[:last + 1]))  # largest volume before peak dP/dt
    edv, edp = vs[ied], plv[ied]
    floor = max(1.0, 0.02 * (edv - v0))
    ratio = np.where(x > floor, plv / np.where(x > floor, x, 1.0), -np.inf)
    ies = int(np.argmax(ratio))
    esv, esp = vs[ies], plv[ies]
    sv = edv - float(np.min(vs))  # the volume ejected
    ea = esp / sv
    hr = 60.0 / period
    r_total = p["resistance_mmhg_s_per_ml"] + p["zc_mmhg_s_per_ml"]
    sw = 0.5 * np.sum(vs * np.roll(plv, -1) - np.roll(vs, -1) * plv)
    xe = esv - v0
    pe = 0.5 * esp * xe - (A * math.expm1(B * xe) / B - A * xe)
    pva = sw + pe
    mass = 1.05 * p["wall_volume_ml"]  # g
    vo2_100g = 1.75e-5 * pva * 100 / mass + 0.031  # Khalafbeigui, Suga & Sagawa 1979, per 100 g
    vo2 = vo2_100g * mass / 100
    imin = int(np.argmin(dpdt))
    win = []
    for i in range(imin, len(ts)):
        if not plv[i] > edp + 5 or plv[i] <= 0:
            break
        win.append(i)
    fit = stats.linregress(ts[win], np.log(plv[win]))
    tau = -1000.0 / fit.slope

    def stress(pr, v):
        wall = p["wall_volume_ml"]
        r = (3 * v / (4 * math.pi)) ** (1 / 3)
        h = (3 * (v + wall) / (4 * math.pi)) ** (1 / 3) - r
        return 1.332 * pr * r / (2 * h * (1 + h / (2 * r)))

    return {
        "edv_ml": edv, "esv_ml": esv, "sv_ml": sv, "ef_pct": 100 * sv / edv, "edp_mmhg": edp, "esp_mmhg": esp,
        "ea_mmhg_per_ml": ea, "ees_mmhg_per_ml": ees, "ea_ees_ratio": ea / ees,
        "ea_hr_r_mmhg_per_ml": r_total / period,
        "ea_segers_mmhg_per_ml": -0.13 + 1.02 * r_total / period + 0.31 / p["compliance_ml_per_mmhg"],
        "hr_bpm": hr, "co_l_per_min": sv * hr / 1000, "map_mmhg": integrate.trapezoid(pao, ts) / period,
        "sbp_mmhg": float(np.max(pao)), "dbp_mmhg": float(np.min(pao)), "sw_mmhg_ml": sw, "pe_mmhg_ml": pe,
        "pva_mmhg_ml": pva, "efficiency": sw / pva, "vo2_ml_per_beat": vo2,
        "vo2_ml_per_beat_100g": vo2_100g, "mechanical_efficiency": sw * 1.333e-4 / (vo2 * 20),
        "dpdt_max_mmhg_per_s": float(np.max(dpdt)), "dpdt_min_mmhg_per_s": float(np.min(dpdt)), "tau_ms": tau,
        "ed_wall_stress_kdyn_cm2": stress(edp, edv), "es_wall_stress_kdyn_cm2": stress(esp, esv),
    }


def main():
    doc = json.load(sys.stdin)
    p = doc["params"]
    start = time.perf_counter()
    model = Model(p)
    a = p["edpvr_a_mmhg"]
    y = np.array([p["v0_ml"] + math.log1p(p["filling_pressure_mmhg"] / a) / p["edpvr_b_per_ml"], 60.0])
    beats = 0
    for beats in range(1, 1001):
        y1, _, _ = model.beat(y)
        change = max(abs(y1[0] - y[0]) / max(abs(y[0]), 10), abs(y1[1] - y[1]) / max(abs(y[1]), 10))
        y = y1
        if change < 1e-10:
            break
    else:
        raise SystemExit("reference: no steady state after 1000 beats")
    _, segments, events = model.beat(y, keep=True)
    beats += 1
    metrics = measure(model, segments, events)
    elapsed = (time.perf_counter() - start) * 1000
    out = {"scenario": doc.get("scenario"), "params": p,
           "metrics": {k: float(v) for k, v in metrics.items()},
           "timing": {"solve_ms": elapsed, "beats": beats},
           "generator": "testdata/reference/reference.py, SciPy " + __import__("scipy").__version__}
    json.dump(out, sys.stdout, indent=2)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
