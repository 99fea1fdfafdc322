#!/usr/bin/python3
"""Reference output of SciPy's Savitzky-Golay filter for savgol_test.go.

Run from this directory: ./savgol.py > savgol.json
Needs Debian's python3-scipy. The input is a deterministic test signal.
"""
import json
import math

import numpy as np
import scipy
from scipy.signal import savgol_filter

dt = 0.001
t = np.arange(400) * dt
# A pulse-like signal with a little deterministic "noise".
y = 10 + 100 * np.exp(-((t - 0.15) / 0.04) ** 2) + 0.7 * np.sin(2 * math.pi * 173 * t) + 0.3 * np.cos(2 * math.pi * 311 * t)
cases = []
for window, order, deriv in [(5, 2, 0), (21, 3, 0), (25, 3, 1), (7, 3, 1), (11, 4, 2)]:
    out = savgol_filter(y, window, order, deriv=deriv, delta=dt, mode="interp")
    cases.append({"window": window, "order": order, "deriv": deriv, "output": out.tolist()})
json.dump({"scipy": scipy.__version__, "dt": dt, "input": y.tolist(), "cases": cases}, __import__("sys").stdout)
