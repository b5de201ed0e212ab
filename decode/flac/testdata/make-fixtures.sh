#!/usr/bin/env bash
# make-fixtures.sh regenerates the FLAC test fixtures of package decode/flac.
#
# Needs Debian's `flac` (1.4 or later, for the 32-bit file) and `sox`
# (apt-get install flac sox). Run it from anywhere; it writes into the
# directory it lives in. The signals are synthetic (tones plus a little
# noise at modest level, never full scale); sox runs in repeatable mode (-R)
# without dither (-D), so a rerun should give the same WAV files.
#
# The WAV files are the sources each FLAC was encoded from; the tests decode
# both and require them to be equal sample for sample.
set -euo pipefail
cd "$(dirname "$0")"

work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT

# mix OUT RATE BITS CHANNELS SECONDS TONE-DB NOISE-DB TONE-ARGS... : tones
# (one synth type per channel) at TONE-DB peak plus white noise at NOISE-DB
# peak, summed without normalisation.
mix() {
	local out=$1 rate=$2 bits=$3 ch=$4 secs=$5 tonedb=$6 noisedb=$7
	shift 7
	sox -R -D -n -r "$rate" -b 32 -c "$ch" "$work/tone.wav" synth "$secs" "$@" gain -n "$tonedb"
	sox -R -D -n -r "$rate" -b 32 -c "$ch" "$work/noise.wav" synth "$secs" whitenoise gain -n "$noisedb"
	sox -R -D -m -v 1 "$work/tone.wav" -v 1 "$work/noise.wav" -b "$bits" "$out"
}

encode() { # encode WAV FLAC [flac options]
	local in=$1 out=$2
	shift 2
	flac --silent --force --no-padding --best "$@" "$in" -o "$out"
}

# Mono, 16-bit, 44.1 kHz, 1.5 s: 440 Hz tone at -12 dBFS plus white noise
# at -60 dBFS.
mix mono16-44k.wav 44100 16 1 1.5 -12 -60 sine 440
encode mono16-44k.wav mono16-44k.flac

# Stereo, 24-bit, 48 kHz, 0.6 s: 1 kHz left and 1.5 kHz right at -18 dBFS
# plus noise at -66 dBFS, so the encoder uses inter-channel coding and
# rice-coded residuals.
mix stereo24-48k.wav 48000 24 2 0.6 -18 -66 sine 1000 sine 1500
encode stereo24-48k.wav stereo24-48k.flac

# 5.1 (six channels L R C LFE Ls Rs), 16-bit, 44.1 kHz, 0.5 s: a different
# tone on every channel (LFE 60 Hz) at -20 dBFS, noise at -72 dBFS. sox
# writes WAVE_FORMAT_EXTENSIBLE with channel mask 0x3F; flac keeps it as the
# WAVEFORMATEXTENSIBLE_CHANNEL_MASK Vorbis comment.
mix surround51-16-44k.wav 44100 16 6 0.5 -20 -72 \
	sine 500 sine 600 sine 700 sine 60 sine 800 sine 900
encode surround51-16-44k.wav surround51-16-44k.flac

# Mono, 8-bit, 8 kHz, 0.5 s: 300 Hz tone at -10 dBFS, noise at -40 dBFS.
mix mono8-8k.wav 8000 8 1 0.5 -10 -40 sine 300
encode mono8-8k.wav mono8-8k.flac

# Mono, 16-bit, 24 kHz, 0.2 s: a sample rate at which mewkiz/flac v1.0.14
# writes a line to the standard logger for every frame.
mix mono16-24k.wav 24000 16 1 0.2 -20 -60 sine 1000
encode mono16-24k.wav mono16-24k.flac

# Mono, 32-bit, 48 kHz, 0.05 s: FLAC 1.4 can encode 32-bit samples; kweigh
# rejects them (unsupported). Only the FLAC is kept.
mix "$work/mono32.wav" 48000 32 1 0.05 -20 -60 sine 440
encode "$work/mono32.wav" mono32-48k.flac

# stereo24-48k-bitflip.flac: stereo24-48k.flac with one bit of audio data
# flipped in the middle of the file (bit 0x10 of the byte at half the file
# size, well past the metadata). The frame's CRC-16 no longer matches.
cp stereo24-48k.flac stereo24-48k-bitflip.flac
size=$(stat -c %s stereo24-48k.flac)
off=$((size / 2))
byte=$(od -An -tu1 -j "$off" -N1 stereo24-48k.flac | tr -d ' ')
printf "$(printf '\\%03o' $((byte ^ 0x10)))" |
	dd of=stereo24-48k-bitflip.flac bs=1 seek="$off" conv=notrunc status=none

ls -l
