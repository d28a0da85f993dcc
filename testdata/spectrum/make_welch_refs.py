#!/usr/bin/python3
"""Reference Welch PSDs from scipy.signal.welch (Debian python3-scipy 1.10.1, python3-numpy 1.24).

Run from the repository root:  /usr/bin/python3 testdata/spectrum/make_welch_refs.py
Writes, in testdata/spectrum/:
  in-complex.cf64, in-real.f64le       small inputs (raw little-endian float64; no quantisation)
  welch-<case>.csv                    frequencyHz,psd  (linear density, FS^2/Hz, ascending frequency)
  capture-<name>.csv                  frequencyHz,psdDbfsPerHz for committed captures, read here with numpy
Every call is scipy.signal.welch(x, fs, window, nperseg, noverlap, detrend=False,
scaling='density', return_onesided=<real input>), as the spectrum command's CSV promises.
"""
import json
import os

import numpy as np
from scipy import signal

HERE = os.path.dirname(os.path.abspath(__file__))
TESTDATA = os.path.dirname(HERE)
rng = np.random.default_rng(20261201)


def write_csv(name, f, p, header):
    order = np.argsort(f, kind="stable")
    with open(os.path.join(HERE, name), "w") as fh:
        fh.write(header + "\n")
        for fi, pi in zip(f[order], p[order]):
            fh.write("%.17g,%.17g\n" % (fi, pi))


# Inputs: a complex tone + a weaker tone + complex noise; a real tone + noise.
fs_c, n_c = 48000.0, 6000
t = np.arange(n_c) / fs_c
xc = 0.5 * np.exp(2j * np.pi * 3210.7 * t) + 0.01 * np.exp(-2j * np.pi * 11000 * t) \
    + 0.001 * (rng.standard_normal(n_c) + 1j * rng.standard_normal(n_c))
inter = np.empty(2 * n_c)
inter[0::2], inter[1::2] = xc.real, xc.imag
inter.astype("<f8").tofile(os.path.join(HERE, "in-complex.cf64"))
fs_r, n_r = 8000.0, 5000
t = np.arange(n_r) / fs_r
xr = 0.7 * np.cos(2 * np.pi * 1234.5 * t) + 0.002 * rng.standard_normal(n_r)
xr.astype("<f8").tofile(os.path.join(HERE, "in-real.f64le"))

cases = [  # name, window (scipy spelling), nperseg, noverlap
    ("hann-256-128", "hann", 256, 128),
    ("hamming-200-100", "hamming", 200, 100),
    ("blackmanharris-512-384", "blackmanharris", 512, 384),
    ("flattop-256-0", "flattop", 256, 0),
    ("boxcar-128-64", "boxcar", 128, 64),
    ("kaiser8.6-256-192", ("kaiser", 8.6), 256, 192),
    ("hann-255-127", "hann", 255, 127),
]
for name, win, nper, nover in cases:
    for kind, x, fs in (("complex", xc, fs_c), ("real", xr, fs_r)):
        f, p = signal.welch(x, fs, window=win, nperseg=nper, noverlap=nover, detrend=False,
                            scaling="density", return_onesided=(kind == "real"))
        write_csv("welch-%s-%s.csv" % (kind, name), f, p, "frequencyHz,psd")


# Committed captures, decoded here with numpy from their raw bytes.
def db_csv(name, x, fs, nper, nover, onesided):
    f, p = signal.welch(x, fs, window="hann", nperseg=nper, noverlap=nover, detrend=False,
                        scaling="density", return_onesided=onesided)
    write_csv("capture-%s.csv" % name, f, 10 * np.log10(p), "frequencyHz,psdDbfsPerHz")


d = np.fromfile(os.path.join(TESTDATA, "sigmf", "nbfm-ci16.sigmf-data"), dtype="<i2").astype(float) / 32768
db_csv("nbfm-ci16-fft1024", d[0::2] + 1j * d[1::2], 48000.0, 1024, 512, False)
d = np.fromfile(os.path.join(TESTDATA, "raw", "tone-100k-2048k.cu8"), dtype=np.uint8).astype(float)
d = (d - 127.5) / 127.5
db_csv("tone-100k-2048k-cu8-fft512", d[0::2] + 1j * d[1::2], 2.048e6, 512, 256, False)
raw = open(os.path.join(TESTDATA, "wav", "sox-mono-s16.wav"), "rb").read()
pcm = np.frombuffer(raw[44:44 + 800], dtype="<i2").astype(float) / 32768
db_csv("sox-mono-s16-fft128", pcm, 8000.0, 128, 64, True)
raw = open(os.path.join(TESTDATA, "wav", "sox-stereo-f32.wav"), "rb").read()
i = raw.index(b"data") + 8
st = np.frombuffer(raw[i:i + 960 * 8], dtype="<f4").astype(float)
db_csv("sox-stereo-f32-fft256", st[0::2] + 1j * st[1::2], 48000.0, 256, 128, False)
print("done")
