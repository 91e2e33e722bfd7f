"""Reference values for Ordinate's Butterworth filters, from scipy.signal.

Regenerate (needs Python 3 with numpy and scipy; CI does not, it reads the JSON):
    python3 scripts/processingFixtures.py > shared/spectra/processing/fixtures/scipyButterworth.json

What it stores:
- gains of scipy.signal.butter(n, fc, btype, fs=fs, output="sos") at fc/2, fc and 2fc for one
  forward pass, for orders 1 to 8, high-pass and low-pass;
- a fixed pseudo-random record (numpy default_rng(20260412), standard normal) and, for a few
  filters, sosfilt forward once (causal) and sosfilt forward then backward, each from rest
  (zero state), which is the zero-phase scheme Ordinate uses. Not sosfiltfilt, which pads by
  itself and starts from steady state.
"""
import json
import sys

import numpy as np
import scipy
from scipy import signal

FS = 100.0
FC = {"highpass": 0.5, "lowpass": 12.5}


def gain(sos, f):
    freqz = getattr(signal, "freqz_sos", None) or signal.sosfreqz
    _, h = freqz(sos, worN=np.array([f]), fs=FS)
    return float(abs(h[0]))


def zero_phase(sos, x):
    y = signal.sosfilt(sos, x)
    return signal.sosfilt(sos, y[::-1])[::-1]


gains = []
for btype, fc in FC.items():
    for order in range(1, 9):
        sos = signal.butter(order, fc, btype, fs=FS, output="sos")
        gains.append(
            {
                "kind": btype,
                "order": order,
                "cornerHz": fc,
                "gainAtHalf": gain(sos, fc / 2),
                "gainAtCorner": gain(sos, fc),
                "gainAtDouble": gain(sos, 2 * fc),
            }
        )

rng = np.random.default_rng(20260412)
record = rng.standard_normal(1200)
runs = []
for btype, order, fc in [("highpass", 4, 0.5), ("highpass", 3, 2.0), ("lowpass", 8, 12.5), ("lowpass", 2, 30.0)]:
    sos = signal.butter(order, fc, btype, fs=FS, output="sos")
    runs.append(
        {
            "kind": btype,
            "order": order,
            "cornerHz": fc,
            "causal": signal.sosfilt(sos, record).tolist(),
            "zeroPhase": zero_phase(sos, record).tolist(),
        }
    )

json.dump(
    {
        "source": f"scipy {scipy.__version__}, numpy {np.__version__}: scripts/processingFixtures.py",
        "sampleRateHz": FS,
        "gains": gains,
        "record": record.tolist(),
        "runs": runs,
    },
    sys.stdout,
    indent=1,
)
sys.stdout.write("\n")
