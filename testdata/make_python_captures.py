#!/usr/bin/python3
"""Makes the raw, SigMF and RF64/BW64 reference captures and the malformed-input corpus.

Written with Debian's python3-numpy (1.24) and the Python standard library only, independently
of SignalInspect's own writers, so the readers are checked against files they did not write.
Run from the repository root:  /usr/bin/python3 testdata/make_python_captures.py
The true parameters of each file are listed in testdata/MANIFEST.md.
"""
import hashlib
import io
import json
import os
import struct
import tarfile

import numpy as np

ROOT = os.path.dirname(os.path.abspath(__file__))


def out(*parts):
    path = os.path.join(ROOT, *parts)
    os.makedirs(os.path.dirname(path), exist_ok=True)
    return path


def tone(n, fs, f, amp, phase=0.0):
    t = np.arange(n) / fs
    return amp * np.exp(1j * (2 * np.pi * f * t + phase))


def fm(n, fs, f0, dev, fm_hz, amp):
    t = np.arange(n) / fs
    return amp * np.exp(1j * (2 * np.pi * f0 * t + dev / fm_hz * np.sin(2 * np.pi * fm_hz * t)))


def interleave(z):
    x = np.empty(2 * len(z))
    x[0::2] = z.real
    x[1::2] = z.imag
    return x


def write_meta(path, meta):
    with open(path, "w") as f:
        json.dump(meta, f, indent=2)
        f.write("\n")


def sigmf(stem, data_bytes, datatype, rate, captures, annotations=(), extra_global=None):
    data_path = out("sigmf", stem + ".sigmf-data")
    with open(data_path, "wb") as f:
        f.write(data_bytes)
    g = {
        "core:datatype": datatype,
        "core:version": "1.2.0",
        "core:sample_rate": rate,
        "core:sha512": hashlib.sha512(data_bytes).hexdigest(),
        "core:description": "reference capture made by make_python_captures.py",
    }
    if extra_global:
        g.update(extra_global)
    meta = {"global": g, "captures": list(captures), "annotations": list(annotations)}
    write_meta(out("sigmf", stem + ".sigmf-meta"), meta)
    return meta


# --- raw cu8: 2.048 MS/s, tone at +100 kHz, amplitude 0.7 of full scale, 8192 samples -------
fs = 2.048e6
z = tone(8192, fs, 100e3, 0.7)
codes = np.clip(np.round(127.5 + 127.5 * interleave(z)), 0, 255).astype(np.uint8)
codes.tofile(out("raw", "tone-100k-2048k.cu8"))

# --- raw ci16_le without a telling ending --------------------------------------------------
z = tone(4000, 1e6, -50e3, 0.5)
np.round(interleave(z) * 32768).astype("<i2").tofile(out("raw", "tone-m50k-1M.iq"))

# --- SigMF ci16_le narrowband FM: 48 kS/s, centre 462.5625 MHz, +2.5 kHz peak at 1 kHz ----
z = fm(9600, 48e3, 250.0, 2500.0, 1000.0, 0.5)
d = np.round(interleave(z) * 32768).astype("<i2").tobytes()
sigmf("nbfm-ci16", d, "ci16_le", 48000,
      [{"core:sample_start": 0, "core:frequency": 462562500, "core:datetime": "2026-03-14T08:15:00.250Z"}],
      [{"core:sample_start": 0, "core:sample_count": 9600, "core:freq_lower_edge": 462556000,
        "core:freq_upper_edge": 462569000, "core:label": "FM voice"}],
      {"core:hw": "reference generator (numpy)"})

# --- SigMF cf32_le unmodulated carrier: 250 kS/s, centre 144.39 MHz, offset +1234.5 Hz -----
z = tone(25000, 250e3, 1234.5, 0.25)
d = interleave(z).astype("<f4").tobytes()
sigmf("cw-cf32", d, "cf32_le", 250000,
      [{"core:sample_start": 0, "core:frequency": 144390000, "core:datetime": "2026-03-14T09:00:00Z"}])

# --- SigMF cf32_be, to check byte order --------------------------------------------------
z = tone(1000, 10e3, 500.0, 0.5)
d = interleave(z).astype(">f4").tobytes()
sigmf("tone-cf32be", d, "cf32_be", 10000, [{"core:sample_start": 0, "core:frequency": 10e6}])

# --- SigMF multi-capture: three segments at different frequencies; the second has 64 header
# bytes; core:offset 1000 (absolute indices); annotations ----------------------------------
segs = [(1000, 433.92e6, 2000), (3000, 434.00e6, 3000), (6000, 434.10e6, 1500)]
blob = bytearray()
captures = []
for i, (start, freq, count) in enumerate(segs):
    cap = {"core:sample_start": start, "core:frequency": freq,
           "core:datetime": "2026-03-14T10:00:0%dZ" % i}
    if i == 1:
        cap["core:header_bytes"] = 64
        blob += bytes(range(64))
    z = tone(count, 100e3, 1000.0 * (i + 1), 0.5)
    blob += np.round(interleave(z) * 127).astype("i1").tobytes()
    captures.append(cap)
sigmf("multi-ci8", bytes(blob), "ci8", 100000, captures,
      [{"core:sample_start": 1200, "core:sample_count": 500, "core:label": "burst A", "core:comment": "first"},
       {"core:sample_start": 6100, "core:label": "burst B"}],
      {"core:offset": 1000})

# --- SigMF two-channel cf32_le (channels interleave sample by sample) ----------------------
z0 = tone(500, 8e3, 1000.0, 0.5)
z1 = tone(500, 8e3, -2000.0, 0.25)
both = np.empty(1000, dtype=complex)
both[0::2] = z0
both[1::2] = z1
sigmf("twoch-cf32", interleave(both).astype("<f4").tobytes(), "cf32_le", 8000,
      [{"core:sample_start": 0, "core:frequency": 100e6}], extra_global={"core:num_channels": 2})

# --- SigMF archive (.sigmf): a recording folder inside a tar made by Python's tarfile --------
z = fm(4800, 48e3, -300.0, 5000.0, 1000.0, 0.5)
d = interleave(z).astype("<f4").tobytes()
meta = {"global": {"core:datatype": "cf32_le", "core:version": "1.2.0", "core:sample_rate": 48000,
                   "core:sha512": hashlib.sha512(d).hexdigest()},
        "captures": [{"core:sample_start": 0, "core:frequency": 151820000}], "annotations": []}
with tarfile.open(out("sigmf", "wbfm-archive.sigmf"), "w", format=tarfile.USTAR_FORMAT) as tar:
    for name, payload in (("rec/rec.sigmf-meta", json.dumps(meta).encode()), ("rec/rec.sigmf-data", d)):
        info = tarfile.TarInfo(name)
        info.size = len(payload)
        info.mtime = 1773475200
        tar.addfile(info, io.BytesIO(payload))


# --- RF64 and BW64 (EBU Tech 3306): 16-bit stereo IQ, 4000 frames, 96 kHz ------------------
def rf64(path, magic, frames):
    z = tone(frames, 96e3, 12e3, 0.5)
    data = np.round(interleave(z) * 32768).astype("<i2").tobytes()
    fmt = struct.pack("<HHIIHH", 1, 2, 96000, 96000 * 4, 4, 16)
    ds64 = struct.pack("<qqqI", 4 + 36 + 24 + len(data) + 8, len(data), frames, 0)
    body = b"WAVE" + b"ds64" + struct.pack("<I", 28) + ds64 + b"fmt " + struct.pack("<I", 16) + fmt \
        + b"data" + struct.pack("<I", 0xFFFFFFFF) + data
    with open(path, "wb") as f:
        f.write(magic + struct.pack("<I", 0xFFFFFFFF) + body)


rf64(out("wav", "py-rf64-s16.wav"), b"RF64", 4000)
rf64(out("wav", "py-bw64-s16.wav"), b"BW64", 4000)

# --- malformed inputs (see testdata/bad/README.md) -----------------------------------------
good = open(out("wav", "sox-mono-s16.wav"), "rb").read()
open(out("bad", "empty.wav"), "wb").close()
open(out("bad", "truncated-header.wav"), "wb").write(good[:30])
open(out("bad", "text-named.wav"), "w").write("These are notes about channel 7, not a recording.\n")
zero_ch = bytearray(good)
zero_ch[22:24] = b"\x00\x00"
open(out("bad", "zero-channels.wav"), "wb").write(zero_ch)
fmt_big = bytearray(good)
fmt_big[16:20] = struct.pack("<I", 0x7FFFFFF0)
open(out("bad", "fmt-size-lies.wav"), "wb").write(fmt_big)
open(out("bad", "noise.cu8"), "wb").write(bytes(range(256)) * 4)          # no sample rate given
open(out("bad", "unknown-ending.bin"), "wb").write(bytes(1024))           # no datatype
open(out("bad", "odd-length.cs16"), "wb").write(bytes(4 * 100 + 3))        # 3 stray bytes
base_meta = {"global": {"core:datatype": "ci16_le", "core:version": "1.2.0", "core:sample_rate": 48000},
             "captures": [{"core:sample_start": 0, "core:frequency": 1e8}], "annotations": []}


def bad_sigmf(stem, meta_text, data=bytes(4000)):
    open(out("bad", stem + ".sigmf-meta"), "w").write(meta_text)
    if data is not None:
        open(out("bad", stem + ".sigmf-data"), "wb").write(data)


bad_sigmf("syntax-error", '{\n  "global": {\n    "core:datatype": "ci16_le",\n    "core:sample_rate": 48000,,\n  }\n}\n')
m = json.loads(json.dumps(base_meta)); m["global"]["core:sample_rate"] = "48000"
bad_sigmf("rate-is-string", json.dumps(m, indent=2))
m = json.loads(json.dumps(base_meta)); m["global"]["core:datatype"] = "cf16_xx"
bad_sigmf("unknown-datatype", json.dumps(m, indent=2))
m = json.loads(json.dumps(base_meta)); del m["global"]["core:sample_rate"]
bad_sigmf("rate-missing", json.dumps(m, indent=2))
m = json.loads(json.dumps(base_meta)); m["global"]["core:sample_rate"] = 0
bad_sigmf("rate-zero", json.dumps(m, indent=2))
m = json.loads(json.dumps(base_meta)); m["global"]["core:sample_rate"] = -48000
bad_sigmf("rate-negative", json.dumps(m, indent=2))
m = json.loads(json.dumps(base_meta)); m["captures"] = {"core:sample_start": 0}
bad_sigmf("captures-not-array", json.dumps(m, indent=2))
bad_sigmf("data-missing", json.dumps(base_meta, indent=2), data=None)
m = json.loads(json.dumps(base_meta)); m["captures"][0]["core:header_bytes"] = 1 << 40
bad_sigmf("header-bytes-too-large", json.dumps(m, indent=2))
m = json.loads(json.dumps(base_meta)); m["global"]["core:sha512"] = hashlib.sha512(b"other").hexdigest()
bad_sigmf("sha512-mismatch", json.dumps(m, indent=2))
m = json.loads(json.dumps(base_meta)); m["global"]["core:num_channels"] = 0
bad_sigmf("zero-channels", json.dumps(m, indent=2))
bad_sigmf("deeply-nested", '{"global": ' + "[" * 5000 + "]" * 5000 + "}")
with tarfile.open(out("bad", "climbing-member.sigmf"), "w", format=tarfile.USTAR_FORMAT) as tar:
    for name, payload in (("../rec.sigmf-meta", json.dumps(base_meta).encode()), ("../rec.sigmf-data", bytes(400))):
        info = tarfile.TarInfo(name)
        info.size = len(payload)
        tar.addfile(info, io.BytesIO(payload))
with tarfile.open(out("bad", "link-member.sigmf"), "w", format=tarfile.USTAR_FORMAT) as tar:
    info = tarfile.TarInfo("rec/rec.sigmf-meta")
    payload = json.dumps(base_meta).encode()
    info.size = len(payload)
    tar.addfile(info, io.BytesIO(payload))
    link = tarfile.TarInfo("rec/rec.sigmf-data")
    link.type = tarfile.SYMTYPE
    link.linkname = "/etc/passwd"
    tar.addfile(link)
open(out("bad", "not-a-tar.sigmf"), "w").write("just text in a file named .sigmf\n" * 40)
print("done")

# --- more hostile inputs (issue: malformed-input corpus) -------------------------------------
s24 = open(out("wav", "sox-mono-s24.wav"), "rb").read()
# Chunk boundaries of the sox 24-bit file: after RIFF header (12), fmt header (20), fmt body (60),
# fact chunk (72), data header (80); each cut is its own file.
for cut in (4, 12, 20, 36, 60, 72, 80, 81):
    open(out("bad", "cut-at-%d.wav" % cut), "wb").write(s24[:cut])
lie = bytearray(good)
lie[40:44] = struct.pack("<I", 10_000_000)          # data chunk claims 10 MB in an 844-byte file
open(out("bad", "data-size-lies.wav"), "wb").write(lie)
ff = bytearray(good)
ff[40:44] = struct.pack("<I", 0xFFFFFFFF)            # streaming writer's "unknown length", no ds64
open(out("bad", "data-size-ffffffff.wav"), "wb").write(ff)
many = bytearray(good)
many[22:24] = struct.pack("<H", 65535)
open(out("bad", "channels-65535.wav"), "wb").write(many)


def float_wav(path, samples):
    data = np.asarray(samples, dtype="<f4").tobytes()
    fmt = struct.pack("<HHIIHH", 3, 1, 8000, 32000, 4, 32)
    with open(path, "wb") as f:
        f.write(b"RIFF" + struct.pack("<I", 4 + 24 + 8 + len(data)) + b"WAVE" + b"fmt " + struct.pack("<I", 16) + fmt
                + b"data" + struct.pack("<I", len(data)) + data)


t8 = np.arange(8000) / 8000
x = 0.5 * np.cos(2 * np.pi * 1000 * t8)
x[100] = np.nan
x[4000] = np.inf
float_wav(out("bad", "nan-inf.wav"), x)
float_wav(out("bad", "all-nan.wav"), np.full(8000, np.nan))
float_wav(out("bad", "all-zero.wav"), np.zeros(8000))
float_wav(out("bad", "twenty-samples.wav"), 0.5 * np.cos(np.arange(20)))
m = json.loads(json.dumps(base_meta)); m["annotations"] = [{"core:sample_start": i, "core:label": "x" * 50} for i in range(20000)]
bad_sigmf("large-annotations", json.dumps(m))
m = json.loads(json.dumps(base_meta)); m["global"]["core:num_channels"] = "one"
bad_sigmf("channels-is-string", json.dumps(m, indent=2))
m = json.loads(json.dumps(base_meta)); m["captures"][0]["core:frequency"] = [462e6]
bad_sigmf("frequency-is-array", json.dumps(m, indent=2))
print("more done")
with tarfile.open(out("bad", "absolute-member.sigmf"), "w", format=tarfile.USTAR_FORMAT) as tar:
    for name, payload in (("/tmp/rec.sigmf-meta", json.dumps(base_meta).encode()), ("/tmp/rec.sigmf-data", bytes(400))):
        info = tarfile.TarInfo(name)
        info.size = len(payload)
        tar.addfile(info, io.BytesIO(payload))
