"""A practitioner's baseline for `npm run bench`: load a two-column trace CSV
with numpy.loadtxt, smooth its derivative with scipy's Savitzky-Golay filter
and pick edges with scipy.signal.find_peaks. Prints the seconds it took as
JSON. Run by scripts/bench.ts when /usr/bin/python3 has numpy and scipy
(Debian: python3-numpy python3-scipy); nothing else needs it.
"""
import json
import sys
import time

import numpy as np
from scipy.signal import find_peaks, savgol_filter

path = sys.argv[1]
t0 = time.perf_counter()
data = np.loadtxt(path, delimiter=",", skiprows=1)
t, v = data[:, 0], data[:, 1]
dv = savgol_filter(np.gradient(v, t), 31, 3)
noise = 1.4826 * np.median(np.abs(dv - np.median(dv)))
peaks, _ = find_peaks(np.abs(dv), height=6 * noise, distance=50)
elapsed = time.perf_counter() - t0
print(json.dumps({"seconds": elapsed, "edges": int(len(peaks))}))
