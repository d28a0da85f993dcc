#!/usr/bin/env python3
# Two builds compared in alternating runs, run by hand (see RESULTS.md):
#   /usr/bin/python3 tests/Benchmarks/ab.py OLD/signalinspect,NEW/signalinspect 0.1,1,10,60 6
# Runs `analyze` (the settings of pipeline.sh) on ${TMPDIR:-/tmp}/si-pipeline-<length>s.cf32 (made by
# pipeline.sh or linearity.py), the builds in turn and their order swapped every round, so that both
# see the same minutes of this shared machine; prints per build and length the best and the median
# wall time, CPU time (user + system) and minor page faults, and each build's 60 s / 10 s ratio.
import subprocess, sys, time, resource, os, statistics
bins = sys.argv[1].split(','); lens = sys.argv[2].split(','); rounds = int(sys.argv[3])
res = {(b, l): [] for b in bins for l in lens}
for r in range(rounds):
    for l in lens:
        for b in (bins if r % 2 == 0 else bins[::-1]):
            f = f'{os.environ.get("TMPDIR", "/tmp")}/si-pipeline-{l}s.cf32'
            r0 = resource.getrusage(resource.RUSAGE_CHILDREN); t0 = time.perf_counter()
            subprocess.run([b, 'analyze', f, '--sample-rate', '2400000', '--obw-noise', 'keep', '--post-lowpass', '15000', '--json', '-'], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=True)
            t = time.perf_counter() - t0; r1 = resource.getrusage(resource.RUSAGE_CHILDREN)
            res[(b, l)].append((t, r1.ru_utime + r1.ru_stime - r0.ru_utime - r0.ru_stime, r1.ru_minflt - r0.ru_minflt))
for l in lens:
    for b in bins:
        v = res[(b, l)]
        print(f"{l:>4} s {b[-40:]:>40}: wall min {min(x[0] for x in v):.3f} med {statistics.median(x[0] for x in v):.3f}  cpu min {min(x[1] for x in v):.3f} med {statistics.median(x[1] for x in v):.3f}  faults {statistics.median(x[2] for x in v):.0f}")
for b in bins:
    m = {l: min(x[0] for x in res[(b, l)]) for l in lens}
    if '10' in m and '60' in m: print(f"{b[-40:]}: 60/10 by min wall {m['60']/m['10']:.2f}")
