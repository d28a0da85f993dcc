#!/usr/bin/python3
"""Captures of known parameters for the measurement tests, written independently of SignalInspect.

Debian python3-numpy 1.24 and the standard library (wave, json, hashlib) only.
Run from the repository root:  /usr/bin/python3 testdata/make_measure_captures.py
True parameters are listed in testdata/MANIFEST.md (section measure/). SNR is the ratio of the
signal's mean power to the noise's mean power over the whole sampled band.
"""
import hashlib
import json
import os
import wave

import numpy as np

HERE = os.path.join(os.path.dirname(os.path.abspath(__file__)), "measure")
os.makedirs(HERE, exist_ok=True)
rng = np.random.default_rng(424242)


def cnoise(n, power):
    return np.sqrt(power / 2) * (rng.standard_normal(n) + 1j * rng.standard_normal(n))


def inter(z):
    x = np.empty(2 * len(z))
    x[0::2], x[1::2] = z.real, z.imag
    return x


def q16(x):
    return np.clip(np.round(x * 32768), -32768, 32767).astype("<i2")


def sigmf(stem, data, datatype, rate, freq, description):
    with open(os.path.join(HERE, stem + ".sigmf-data"), "wb") as f:
        f.write(data)
    meta = {"global": {"core:datatype": datatype, "core:version": "1.2.0", "core:sample_rate": rate,
                       "core:sha512": hashlib.sha512(data).hexdigest(), "core:description": description},
            "captures": [{"core:sample_start": 0, "core:frequency": freq, "core:datetime": "2026-04-02T07:45:00Z"}],
            "annotations": []}
    with open(os.path.join(HERE, stem + ".sigmf-meta"), "w") as f:
        json.dump(meta, f, indent=2)


# 1. Mono audio WAV: AM on a 12 kHz carrier in the audio band (a receiver's IF output), m = 0.7,
#    tone 1000 Hz, 48 kHz, 1.5 s, 16-bit, SNR 35 dB.
fs, n = 48000, 72000
t = np.arange(n) / fs
x = 0.45 * (1 + 0.7 * np.cos(2 * np.pi * 1000 * t)) * np.cos(2 * np.pi * 12000 * t)
p = np.mean(x ** 2)
x = x + np.sqrt(p / 10 ** 3.5) * rng.standard_normal(n)
with wave.open(os.path.join(HERE, "am-audio-12k.wav"), "wb") as w:
    w.setnchannels(1)
    w.setsampwidth(2)
    w.setframerate(fs)
    w.writeframes(q16(x).tobytes())

# 2. IQ WAV (stereo 16-bit, I on the left): PM, peak phase 1.0 rad, tone 800 Hz, carrier
#    offset +1500 Hz, 48 kHz, 1.5 s, SNR 30 dB.
z = 0.5 * np.exp(1j * (2 * np.pi * 1500 * t + 1.0 * np.sin(2 * np.pi * 800 * t)))
z = z + cnoise(n, 0.25 / 1000)
with wave.open(os.path.join(HERE, "pm-iq.wav"), "wb") as w:
    w.setnchannels(2)
    w.setsampwidth(2)
    w.setframerate(fs)
    w.writeframes(q16(inter(z)).tobytes())

# 3. Raw cu8 wideband FM: 1.024 MS/s, 0.5 s, carrier offset -120 kHz, peak deviation 75 kHz,
#    tone 15 kHz (beta 5), amplitude 0.7, SNR 30 dB, codes round(127.5 + 127.5 x).
fs3, n3 = 1.024e6, 512000
t3 = np.arange(n3) / fs3
z = 0.7 * np.exp(1j * (2 * np.pi * -120e3 * t3 + 5.0 * np.sin(2 * np.pi * 15e3 * t3)))
z = z + cnoise(n3, 0.49 / 1000)
np.clip(np.round(127.5 + 127.5 * inter(z)), 0, 255).astype(np.uint8).tofile(os.path.join(HERE, "wbfm-1024k.cu8"))

# 4. SigMF ci16_le narrowband FM: 48 kS/s, 1.5 s, centre 151.625 MHz, offset +350 Hz,
#    peak deviation 2500 Hz, tone 1000 Hz, SNR 30 dB.
z = 0.5 * np.exp(1j * (2 * np.pi * 350 * t + 2.5 * np.sin(2 * np.pi * 1000 * t))) + cnoise(n, 0.25 / 1000)
sigmf("nbfm-151625", q16(inter(z)).tobytes(), "ci16_le", 48000, 151625000, "NBFM reference, 2.5 kHz deviation at 1 kHz")

# 5. SigMF ci16_le unmodulated carrier: 48 kS/s, 1.5 s, centre 462.5625 MHz, offset -777.7 Hz,
#    amplitude 0.5, SNR 30 dB.
z = 0.5 * np.exp(1j * 2 * np.pi * -777.7 * t) + cnoise(n, 0.25 / 1000)
sigmf("cw-462", q16(inter(z)).tobytes(), "ci16_le", 48000, 462562500, "unmodulated carrier reference")

# 6. SigMF ci16_le binary CPFSK: 48 kS/s, 1.5 s, centre 433.92 MHz, centre of the tones at
#    +2000 Hz, shift 1200 Hz (tones +1400 and +2600 Hz), 1000 Bd (h = 1.2), random bits, SNR 30 dB.
bits = rng.integers(0, 2, int(1.5 * 1000) + 1)
sym = np.floor(t * 1000).astype(int)
f_inst = 2000 + np.where(bits[sym] == 1, 600.0, -600.0)
phase = 2 * np.pi * np.cumsum(f_inst) / fs
z = 0.5 * np.exp(1j * phase) + cnoise(n, 0.25 / 1000)
sigmf("fsk-433", q16(inter(z)).tobytes(), "ci16_le", 48000, 433920000, "2-FSK reference, shift 1200 Hz, 1000 Bd")
print("done")
