#!/usr/bin/env bash
# Runs the benchmarks by hand (not part of the test suite): bash tests/Benchmarks/run.sh [--smoke]
# The welch mode makes a 60 s, 2.4 MS/s cf32 capture (1.15 GB) in $TMPDIR on first use.
set -euo pipefail
cd "$(dirname "$0")/../.."
dotnet build -c Release tests/Benchmarks/SignalInspect.Benchmarks.csproj >/dev/null
dll=tests/Benchmarks/bin/Release/net10.0/SignalInspect.Benchmarks.dll
dotnet "$dll" fft "$@"
dotnet "$dll" welch "$@"
