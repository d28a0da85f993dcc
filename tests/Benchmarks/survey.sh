#!/usr/bin/env bash
# Survey against analyze on the pipeline benchmark's captures, run by hand (see RESULTS.md, issue 24):
#   bash tests/Benchmarks/survey.sh [SIGNALINSPECT]
# The captures are pipeline.sh's (60 s and 10 s, 2.4 MS/s cf32, one FM emission): made here with the given
# executable when missing. For each, analyze --json and survey --json run in turn, five rounds, best wall time and
# largest peak RSS kept; prints the survey / analyze ratio (target at most 3) and the survey's RSS at 10 s and
# 60 s (flat in the capture's length). SIGNALINSPECT defaults to a native AOT build published into $TMPDIR.
set -euo pipefail
cd "$(dirname "$0")/../.."
tmp="${TMPDIR:-/tmp}"
[[ -x /usr/bin/time ]] || (DEBIAN_FRONTEND=noninteractive apt-get install -y -q time >/dev/null)
if [[ $# -ge 1 ]]; then
  SI=("$@")
else
  aot="$tmp/si-bench-aot"
  dotnet publish src/SignalInspect.Cli/SignalInspect.Cli.csproj -c Release -r linux-x64 -p:PublishAot=true -p:IlcInstructionSet=native -o "$aot" >"$tmp/si-bench-aot.log" 2>&1
  SI=("$aot/signalinspect")
fi
for s in 60 10; do
  f="$tmp/si-pipeline-${s}s.cf32"
  [[ -f "$f" ]] || "${SI[@]}" synth "$f" --kind fm --sample-rate 2400000 --duration $s --deviation 75000 --tone 1000 --snr 40 --offset 12500 --force >/dev/null
done
# run NAME CMD...: wall seconds and peak RSS (MB) of one run, appended to the NAME lists.
declare -A best rss
run() {
  local name=$1; shift
  /usr/bin/time -f "%e %M" -o "$tmp/si-survey.time" "$@" >"$tmp/si-survey.out" 2>"$tmp/si-survey.err" || { cat "$tmp/si-survey.err" >&2; exit 3; }
  read -r w k <"$tmp/si-survey.time"
  local m=$((k / 1024))
  if [[ -z "${best[$name]:-}" ]] || awk "BEGIN{exit !($w < ${best[$name]})}"; then best[$name]=$w; fi
  if [[ -z "${rss[$name]:-}" ]] || (( m > ${rss[$name]} )); then rss[$name]=$m; fi
}
for i in 1 2 3 4 5; do
  for s in 60 10; do
    f="$tmp/si-pipeline-${s}s.cf32"
    run "analyze-$s" "${SI[@]}" analyze "$f" --json "$tmp/si-survey-a.json" --force
    run "survey-$s" "${SI[@]}" survey "$f" --json "$tmp/si-survey-s.json" --force
  done
done
"${SI[@]}" survey "$tmp/si-pipeline-60s.cf32" | head -3
for s in 60 10; do
  printf '%3s s: analyze %6.2f s %4d MB | survey %6.2f s %4d MB | survey / analyze %.2f\n' "$s" \
    "${best[analyze-$s]}" "${rss[analyze-$s]}" "${best[survey-$s]}" "${rss[survey-$s]}" \
    "$(awk "BEGIN{print ${best[survey-$s]} / ${best[analyze-$s]}}")"
done
