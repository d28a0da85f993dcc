#!/usr/bin/env bash
# Shows that a change leaves the tool's outputs as they were, run by hand:
#   bash tests/Identity/compare-outputs.sh [--console] BASE_REV [NEW_REV]   (NEW_REV default: the work tree)
# Builds both revisions (Release), then runs with each build, byte for byte compared:
#   - `analyze --json -` on every capture in testdata/ that analyze accepts (wav, raw, sigmf,
#     measure) and on the demo's three captures, plus options that reach other paths
#     (--expect, --rbw, --start/--duration, --post-lowpass, --deemphasis, --obw-noise keep);
#   - the exit code of each run; its standard error (the console summary, warnings and error lines)
#     is compared too, but a difference there only counts with --console (the redesign changed the
#     console summary on purpose; the JSON did not change);
#   - `info --json -` on the same captures;
#   - the demo's report models (reports/demo/*.json) and its summary table.
# Prints one line per difference and "identical: N outputs" at the end; exit 1 on a difference.
set -euo pipefail
cd "$(dirname "$0")/../.."
console=false
[[ "${1:-}" == "--console" ]] && { console=true; shift; }
base=${1:?usage: compare-outputs.sh [--console] BASE_REV [NEW_REV]}
new=${2:-}
tmp=$(mktemp -d "${TMPDIR:-/tmp}/si-identity.XXXXXX")
trap 'git worktree remove --force "$tmp/base-src" >/dev/null 2>&1 || true; [[ -n "$new" ]] && git worktree remove --force "$tmp/new-src" >/dev/null 2>&1; rm -rf "$tmp"' EXIT

build() { # build REV|"" DIR -> publishes the CLI into DIR/bin
  local rev=$1 dir=$2 src
  if [[ -z "$rev" ]]; then src=$PWD; else git worktree add --detach "$dir-src" "$rev" >/dev/null 2>&1; src="$dir-src"; fi
  dotnet publish "$src/src/SignalInspect.Cli/SignalInspect.Cli.csproj" -c Release -o "$dir/bin" >/dev/null
}
build "$base" "$tmp/base"
build "$new" "$tmp/new"

# The demo writes the captures it measures; both builds must see the same files: made once by base.
dotnet "$tmp/base/bin/signalinspect.dll" demo --out "$tmp/demo-base" >"$tmp/demo-base.txt" 2>/dev/null
dotnet "$tmp/new/bin/signalinspect.dll" demo --out "$tmp/demo-new" >"$tmp/demo-new.txt" 2>/dev/null
d="$tmp/demo-base/demo"

cases=(
  "testdata/measure/am-audio-12k.wav"
  "testdata/measure/pm-iq.wav"
  "testdata/measure/pm-iq.wav --expect fm"
  "testdata/measure/wbfm-1024k.cu8 --sample-rate 1.024M"
  "testdata/measure/wbfm-1024k.cu8 --sample-rate 1.024M --obw-noise keep --post-lowpass 15k --deemphasis 75"
  "testdata/measure/nbfm-151625.sigmf-meta"
  "testdata/measure/nbfm-151625.sigmf-meta --nominal 151.625M --rbw 50 --start 0.2 --duration 1"
  "testdata/measure/cw-462.sigmf-meta"
  "testdata/measure/cw-462.sigmf-meta --window kaiser:7.5 --fft 2048"
  "testdata/measure/fsk-433.sigmf-meta"
  "testdata/measure/fsk-433.sigmf-meta --expect fm --window blackmanharris"
  "testdata/sigmf/nbfm-ci16.sigmf-meta"
  "testdata/sigmf/cw-cf32.sigmf-meta"
  "testdata/sigmf/tone-cf32be.sigmf-meta"
  "testdata/sigmf/multi-ci8.sigmf-meta --segment 1"
  "testdata/sigmf/twoch-cf32.sigmf-meta"
  "testdata/sigmf/wbfm-archive.sigmf"
  "testdata/raw/tone-100k-2048k.cu8 --sample-rate 2.048M"
  "testdata/raw/tone-m50k-1M.iq --sample-rate 1M --datatype ci16_le"
  "testdata/wav/sox-stereo-f32.wav"
  "testdata/wav/py-rf64-s16.wav"
  "testdata/wav/sox-mono-s16.wav"
  "testdata/bad/noise.cu8 --sample-rate 1M"
  "testdata/bad/all-zero.wav"
  "$d/hwa-handheld-ch7.sigmf"
  "$d/hwa-am-test-set.wav --center-frequency 1.53M --nominal 1.53M"
  "$d/hwa-telemetry-burst.sigmf-meta --nominal 457.9875M"
)
n=0; bad=0; consoles=0
compare() { # compare LABEL FILE_A FILE_B
  n=$((n + 1))
  if ! cmp -s "$2" "$3"; then bad=$((bad + 1)); echo "DIFFERENT: $1"; diff <(head -c 4000 "$2") <(head -c 4000 "$3") | head -8 || true; fi
}
i=0
for c in "${cases[@]}"; do
  i=$((i + 1))
  for side in base new; do
    # shellcheck disable=SC2086
    (dotnet "$tmp/$side/bin/signalinspect.dll" analyze $c --json - >"$tmp/$side.a$i.out" 2>"$tmp/$side.a$i.err"; echo "exit $?" >"$tmp/$side.a$i.code") || true
    # shellcheck disable=SC2086
    (dotnet "$tmp/$side/bin/signalinspect.dll" info ${c%% *} --json - ${c#* } >"$tmp/$side.i$i.out" 2>/dev/null) || true
  done
  compare "analyze $c (stdout)" "$tmp/base.a$i.out" "$tmp/new.a$i.out"
  compare "analyze $c (exit code)" "$tmp/base.a$i.code" "$tmp/new.a$i.code"
  if $console; then compare "analyze $c (console)" "$tmp/base.a$i.err" "$tmp/new.a$i.err"
  elif ! cmp -s "$tmp/base.a$i.err" "$tmp/new.a$i.err"; then consoles=$((consoles + 1)); fi
done
# A report model carries its creation time, its id (made from that time) and the capture's path:
# those lines are set aside before the comparison.
norm() { sed -E -e "s#$tmp/demo-(base|new)#DIR#g" -e '/^ *"(id|created)": /d' "$1"; }
for f in "$tmp/demo-base/demo/"*.json; do
  b=$(basename "$f")
  norm "$f" >"$tmp/$b.base"; norm "$tmp/demo-new/demo/$b" >"$tmp/$b.new"
  compare "demo $b" "$tmp/$b.base" "$tmp/$b.new"
done
norm "$tmp/demo-base.txt" >"$tmp/demo-base.norm"; norm "$tmp/demo-new.txt" >"$tmp/demo-new.norm"
if $console; then compare "demo summary" "$tmp/demo-base.norm" "$tmp/demo-new.norm"
elif ! cmp -s "$tmp/demo-base.norm" "$tmp/demo-new.norm"; then consoles=$((consoles + 1)); fi
((consoles > 0)) && echo "console text differs in $consoles run(s) (not counted; --console compares it)"
if ((bad > 0)); then echo "$bad of $n outputs differ"; exit 1; fi
echo "identical: $n outputs"
