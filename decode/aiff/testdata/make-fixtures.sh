#!/usr/bin/env bash
# make-fixtures.sh regenerates the AIFF test fixtures of package decode/aiff.
#
# Needs Debian's `sox` (apt-get install sox). Run it from anywhere; it writes
# into the directory it lives in. The signals are synthetic tones plus a
# little noise at modest level; sox runs in repeatable mode (-R) without
# dither (-D). Each AIFF/AIFF-C file is converted from the WAV beside it and
# the tests require the two to decode to the same samples. AIFF-C variants
# sox cannot write (sowt, fl64, twos, 8/32-bit, SSND offsets) are built by
# the Go tests themselves (writer_test.go).
set -euo pipefail
cd "$(dirname "$0")"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT

# mix OUT RATE BITS CHANNELS SECONDS TONE-DB NOISE-DB TONE-ARGS...
mix() {
	local out=$1 rate=$2 bits=$3 ch=$4 secs=$5 tonedb=$6 noisedb=$7
	shift 7
	sox -R -D -n -r "$rate" -b 32 -c "$ch" "$work/tone.wav" synth "$secs" "$@" gain -n "$tonedb"
	sox -R -D -n -r "$rate" -b 32 -c "$ch" "$work/noise.wav" synth "$secs" whitenoise gain -n "$noisedb"
	sox -R -D -m -v 1 "$work/tone.wav" -v 1 "$work/noise.wav" -b "$bits" "$out"
}

# Stereo, 16-bit, 44.1 kHz, 0.2 s: 440 Hz left, 660 Hz right at -10 dBFS,
# noise at -50 dBFS.
mix stereo16-44k.wav 44100 16 2 0.2 -10 -50 sine 440 sine 660
sox -R -D stereo16-44k.wav stereo16-44k.aiff                 # AIFF, 16-bit big-endian
sox -R -D stereo16-44k.wav stereo16-44k.aifc                 # AIFF-C, 'NONE'
sox -R -D stereo16-44k.wav -e floating-point -b 32 stereo16-44k-fl32.aifc # AIFF-C, 'fl32'

# Mono, 24-bit, 48 kHz, 0.2 s: 1 kHz at -20 dBFS, noise at -70 dBFS.
mix mono24-48k.wav 48000 24 1 0.2 -20 -70 sine 1000
sox -R -D mono24-48k.wav mono24-48k.aiff                     # AIFF, 24-bit big-endian

ls -l
