#!/usr/bin/env bash
# Makes the seed corpus of FuzzDetect: the first 2 KiB of each container
# the bridge recognises, encoded with ffmpeg from a synthetic sox signal
# (no ffmpeg filter is used). Run from this folder; needs ffmpeg and sox.
set -euo pipefail
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
out=fuzz/FuzzDetect; mkdir -p "$out"
sox -n -r 48000 -b 24 -c 2 "$tmp/s.wav" synth 1 sine 997 gain -20
sox -n -r 48000 -b 24 -c 6 "$tmp/six.wav" synth 1 sine 500 gain -25
head -c $((64*64*3/2*25)) /dev/zero > "$tmp/v.yuv"
ff() { ffmpeg -nostdin -v error -y "$@"; }
ff -i "$tmp/s.wav" -c:a aac -aac_pns 0 "$tmp/a.m4a"
ff -i "$tmp/s.wav" -c:a aac -aac_pns 0 -movflags +faststart "$tmp/fast.m4a"
ff -i "$tmp/s.wav" -c:a pcm_s24le "$tmp/p.mov"
ff -i "$tmp/s.wav" -c:a aac -aac_pns 0 "$tmp/a.aac"
ff -i "$tmp/six.wav" -c:a ac3 "$tmp/a.ac3"
ff -i "$tmp/six.wav" -c:a eac3 "$tmp/a.eac3"
ff -i "$tmp/s.wav" -c:a libvorbis "$tmp/v.ogg"
ff -i "$tmp/s.wav" -c:a flac "$tmp/f.mka"
ff -f rawvideo -pix_fmt yuv420p -s 64x64 -r 25 -i "$tmp/v.yuv" -i "$tmp/s.wav" -c:v mpeg2video -c:a pcm_s24le "$tmp/m.mxf"
for f in "$tmp"/*.m4a "$tmp"/*.mov "$tmp"/*.aac "$tmp"/*.ac3 "$tmp"/*.eac3 "$tmp"/*.ogg "$tmp"/*.mka "$tmp"/*.mxf; do
  name=$(basename "$f" | tr . -)
  python3 - "$f" "$out/$name" <<'PY'
import sys
b = open(sys.argv[1], 'rb').read()[:2048]
open(sys.argv[2], 'w').write('go test fuzz v1\n[]byte(%s)\n' % ('"' + ''.join('\\x%02x' % c for c in b) + '"'))
PY
done
