#!/usr/bin/python3
"""The straightforward numpy/scipy way to measure an FM cf32 capture, as a competent engineer
would write it without SignalInspect: the yardstick of tests/Benchmarks/pipeline.sh.

    reference_pipeline.py CAPTURE.cf32 SAMPLE_RATE_HZ POST_LOWPASS_HZ

Prints one JSON line: occupiedHz (99 %, ITU-R SM.328 beta/2 summation over the Welch PSD, each
bin holding its power uniformly over its width, noise kept), lowerEdgeHz, upperEdgeHz,
peakDeviationHz (largest |deviation - mean| after the low-pass), samples.

Needs Debian's python3-numpy and python3-scipy (the script that calls this installs them).
"""
import json
import sys

import numpy as np
from scipy import signal


def main():
    path, fs, post_lp = sys.argv[1], float(sys.argv[2]), float(sys.argv[3])
    x = np.fromfile(path, dtype=np.complex64)

    # Spectrum: Welch, Hann, 4096 points, 50 % overlap, two-sided density.
    f, p = signal.welch(x, fs, window="hann", nperseg=4096, noverlap=2048, detrend=False,
                        return_onesided=False, scaling="density")
    f, p = np.fft.fftshift(f), np.fft.fftshift(p)
    bw = fs / 4096
    power = p * bw
    target = 0.005 * power.sum()
    cum = np.cumsum(power)
    i = int(np.searchsorted(cum, target))
    lower = f[i] - bw / 2 + (target - (cum[i - 1] if i else 0.0)) / power[i] * bw
    rcum = np.cumsum(power[::-1])
    j = int(np.searchsorted(rcum, target))
    k = len(p) - 1 - j
    upper = f[k] + bw / 2 - (target - (rcum[j - 1] if j else 0.0)) / power[k] * bw

    # FM: phase difference of consecutive samples, then a low-pass FIR and the largest excursion.
    dev = np.angle(x[1:] * np.conj(x[:-1])) * fs / (2 * np.pi)
    taps = signal.firwin(1001, post_lp, fs=fs)
    y = signal.oaconvolve(dev, taps, mode="valid")
    peak = float(np.max(np.abs(y - y.mean())))

    print(json.dumps({"occupiedHz": float(upper - lower), "lowerEdgeHz": float(lower), "upperEdgeHz": float(upper),
                      "peakDeviationHz": peak, "samples": int(len(x))}))


if __name__ == "__main__":
    main()
