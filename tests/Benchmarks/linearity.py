#!/usr/bin/env python3
# Time against capture length, run by hand (after pipeline.sh, whose native build and 0.1, 10 and 60 s
# captures in $TMPDIR it reuses; missing captures are synthesised with the same settings):
#   /usr/bin/python3 tests/Benchmarks/linearity.py ${TMPDIR:-/tmp}/si-bench-aot/signalinspect
# Each capture is put in the same page-cache state first (as pipeline.sh does); best of three runs each;
# a least-squares line T = F + k x length over 1-60 s separates the fixed cost F from the per-second cost k.
import subprocess, time, os, sys
import numpy as np
B = sys.argv[1]
def warm(f):
    fd = os.open(f, os.O_RDONLY); os.fsync(fd); os.posix_fadvise(fd, 0, 0, os.POSIX_FADV_DONTNEED); os.close(fd)
    with open(f, 'rb') as h:
        while h.read(1 << 24): pass
rows = []
for s in ['0.1', '1', '10', '30', '60']:
    f = os.path.join(os.environ.get('TMPDIR', '/tmp'), f'si-pipeline-{s}s.cf32')
    if not os.path.exists(f):
        subprocess.run([B, 'synth', f, '--kind', 'fm', '--sample-rate', '2400000', '--duration', s, '--deviation', '75000',
                        '--tone', '1000', '--snr', '40', '--offset', '12500', '--force'], stdout=subprocess.DEVNULL, check=True)
    warm(f)
    best = 99
    for i in range(3):
        t = time.perf_counter()
        subprocess.run([B, 'analyze', f, '--sample-rate', '2400000', '--obw-noise', 'keep', '--post-lowpass', '15000', '--json', '-'], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=True)
        best = min(best, time.perf_counter() - t)
    rows.append((float(s), best))
    print(f"{s:>4} s capture: {best:.3f} s (best of 3)")
L = np.array([r[0] for r in rows[1:]]); T = np.array([r[1] for r in rows[1:]])
k, F = np.polyfit(L, T, 1)
print(f"least-squares line over 1-60 s: T = {F:.3f} s + {k * 1000:.2f} ms per second of capture; residuals {np.round(T - (F + k * L), 3)}")
print(f"60 s / 10 s = {rows[4][1] / rows[2][1]:.2f}")
