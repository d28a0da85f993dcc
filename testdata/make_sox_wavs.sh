#!/usr/bin/env bash
# Makes the WAV reference files with sox (Debian package sox, SoX v14.4.2), an outside tool,
# and beside each one sox's own decoding of it as raw little-endian float64 (.f64, channels
# interleaved): the readers must decode every file to the same values.
# -D: no dither, so that the files are reproducible. Run from testdata/: bash make_sox_wavs.sh
set -euo pipefail
cd "$(dirname "$0")/wav"
mk() { # name, sox output options, synth arguments...
  local name=$1 opts=$2; shift 2
  # shellcheck disable=SC2086
  sox -D -n $opts "$name" synth "$@"
  sox -D "$name" -t f64 "${name%.wav}.f64"
}
mk sox-mono-u8.wav   "-r 8000 -c 1 -b 8 -e unsigned-integer" 0.05 sine 1000 vol 0.5
mk sox-mono-s16.wav  "-r 8000 -c 1 -b 16 -e signed-integer"  0.05 sine 1000 vol 0.5
mk sox-mono-s24.wav  "-r 8000 -c 1 -b 24 -e signed-integer"  0.05 sine 1000 vol 0.5
mk sox-mono-s32.wav  "-r 8000 -c 1 -b 32 -e signed-integer"  0.05 sine 1000 vol 0.5
mk sox-mono-f32.wav  "-r 8000 -c 1 -b 32 -e floating-point"  0.05 sine 1000 vol 0.5
mk sox-mono-f64.wav  "-r 8000 -c 1 -b 64 -e floating-point"  0.05 sine 1000 vol 0.5
# Two channels: the second is the first shifted by a quarter period (25 %), i.e. an I/Q pair
# of a tone at +1000 Hz when channel 0 is I.
mk sox-stereo-s16.wav "-r 8000 -c 2 -b 16 -e signed-integer" 0.05 sine 1000 0 0 sine 1000 0 25 vol 0.5
mk sox-stereo-f32.wav "-r 48000 -c 2 -b 32 -e floating-point" 0.02 sine 3000 0 0 sine 3000 0 25 vol 0.5
mk sox-3ch-s16.wav   "-r 8000 -c 3 -b 16 -e signed-integer"  0.05 sine 500 sine 1000 sine 1500 vol 0.5
