#!/usr/bin/env bash
# Makes the seed corpus of FuzzOpus: tiny opusenc files (mono, stereo,
# 5.1) from synthetic sox signals, and a truncated and a byte-flipped copy.
# Run from this folder; needs sox and opus-tools.
set -euo pipefail
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
out=fuzz/FuzzOpus; mkdir -p "$out"
sox -n -r 48000 -b 16 -c 1 "$tmp/m.wav" synth 0.1 sine 440 gain -20
sox -n -r 48000 -b 16 -c 2 "$tmp/s.wav" synth 0.1 sine 997 gain -20
sox -n -r 44100 -b 16 -c 6 "$tmp/six.wav" synth 0.1 sine 500 gain -25
for n in m s six; do opusenc --quiet --bitrate 32 "$tmp/$n.wav" "$tmp/$n.opus"; done
seed() {
  python3 - "$1" "$2" "$3" <<'PY'
import sys
b = bytearray(open(sys.argv[1], 'rb').read())
if sys.argv[3] == 'cut': b = b[:len(b) * 2 // 3]
if sys.argv[3] == 'flip': b[len(b) // 2] ^= 0xFF
open(sys.argv[2], 'w').write('go test fuzz v1\n[]byte(%s)\n' % ('"' + ''.join('\\x%02x' % c for c in b) + '"'))
PY
}
for n in m s six; do seed "$tmp/$n.opus" "$out/$n" whole; done
seed "$tmp/s.opus" "$out/s-cut" cut
seed "$tmp/s.opus" "$out/s-flip" flip
# The example file of ExampleNew: the stereo 0.1 s encoding itself.
cp "$tmp/s.opus" example-stereo.opus
