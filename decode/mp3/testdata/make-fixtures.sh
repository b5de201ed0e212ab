#!/usr/bin/env bash
# make-fixtures.sh regenerates the MP3 test fixtures of package decode/mp3.
#
# Needs Debian's sox (14.4), lame (3.100) and flac. The signals are synthetic
# (noise bursts, harmonic tones, chords) made here; nothing is taken from any
# recording. Sources are kept as FLAC (lossless, smaller than WAV) so the tests
# can compare the decoded MP3 with the exact samples lame was given.
#
# Run from anywhere: bash decode/mp3/testdata/make-fixtures.sh
set -euo pipefail
cd "$(dirname "$0")"
for tool in sox lame flac; do
	command -v "$tool" >/dev/null || { echo "make-fixtures.sh: needs $tool (apt-get install $tool)" >&2; exit 1; }
done
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
SOX="sox -R -D --no-show-progress" # -R: repeatable random numbers; -D: no dither

# speech_like RATE OUT: mono, about 5 s of syllable-like bursts with pauses:
# band-limited noise ("consonants") and amplitude-modulated harmonic tones
# ("vowels"), peak normalised to -6 dBFS.
speech_like() {
	local rate=$1 out=$2 parts=() i=0
	for spec in "noise 0.25 0.15" "tone 140 0.45 0.10" "noise 0.15 0.05" "tone 175 0.60 0.45" \
		"noise 0.20 0.10" "tone 120 0.50 0.15" "tone 160 0.35 0.60" "noise 0.30 0.10" \
		"tone 150 0.55 0.20" "noise 0.10 0.05" "tone 190 0.40 0.50"; do
		set -- $spec
		i=$((i + 1))
		if [ "$1" = noise ]; then
			$SOX -r "$rate" -c 1 -n -b 16 "$tmp/p$i.wav" synth "$2" pinknoise gain -10 sinc 1500-6000 \
				fade q 0.02 "$2" 0.03 pad 0 "$3"
		else
			$SOX -r "$rate" -c 1 -n -b 16 "$tmp/p$i.wav" synth "$3" sawtooth "$2" gain -10 sinc -3400 \
				tremolo 6 40 fade q 0.04 "$3" 0.08 pad 0 "$4"
		fi
		parts+=("$tmp/p$i.wav")
	done
	$SOX "${parts[@]}" -b 16 "$out" trim 0 5 gain -n -6
}

# music_like RATE SECONDS PEAK OUT: stereo chords (A major then D major with a
# bass line) plus quiet pink noise; the channels carry different voicings.
# PEAK is the sample peak in dBFS after normalisation.
music_like() {
	local rate=$1 secs=$2 peak=$3 out=$4 half
	half=$(echo "$secs / 2" | bc -l)
	$SOX -r "$rate" -c 4 -n -b 16 "$tmp/l1.wav" synth "$half" sine 220 sine 277.18 sine 329.63 sine 110 remix 1-4 gain -6
	$SOX -r "$rate" -c 4 -n -b 16 "$tmp/l2.wav" synth "$half" sine 293.66 sine 369.99 sine 440 sine 146.83 remix 1-4 gain -6
	$SOX -r "$rate" -c 4 -n -b 16 "$tmp/r1.wav" synth "$half" sine 440 sine 554.37 sine 659.26 sine 110 remix 1-4 gain -6
	$SOX -r "$rate" -c 4 -n -b 16 "$tmp/r2.wav" synth "$half" sine 587.33 sine 739.99 sine 880 sine 146.83 remix 1-4 gain -6
	$SOX "$tmp/l1.wav" "$tmp/l2.wav" "$tmp/left.wav"
	$SOX "$tmp/r1.wav" "$tmp/r2.wav" "$tmp/right.wav"
	$SOX -r "$rate" -c 1 -n -b 16 "$tmp/noise.wav" synth "$secs" pinknoise gain -30
	$SOX -m "$tmp/left.wav" "$tmp/noise.wav" "$tmp/leftn.wav"
	$SOX -m "$tmp/right.wav" "$tmp/noise.wav" "$tmp/rightn.wav"
	$SOX -M "$tmp/leftn.wav" "$tmp/rightn.wav" -b 16 "$out" tremolo 2 30 fade q 0.05 "$secs" 0.2 gain -n "$peak"
}

# hot: 1 s of square waves (220 Hz left, 277.18 Hz right) peaking at
# -0.5 dBFS. A square wave's band-limited reconstruction overshoots by about
# 9 % (Gibbs), so the decoded MP3 exceeds full scale and the decoder clamps.
hot() {
	$SOX -r "$1" -c 2 -n -b 16 "$2" synth 1 square 220 square 277.18 fade q 0.01 1 0.01 gain -n -0.5
}

speech_like 44100 "$tmp/speech-m44.wav"
music_like 48000 4 -6 "$tmp/music-s48.wav"
hot 44100 "$tmp/hot-s44.wav"
$SOX "$tmp/speech-m44.wav" "$tmp/speech-2s.wav" trim 0 2

# Lossless copies of the sources the tests compare against.
for src in speech-m44 music-s48 hot-s44; do
	flac --silent --force -8 --no-padding -o "$src.flac" "$tmp/$src.wav"
done

# lame 3.100 multiplies the input of CBR encodes by 0.95 (up to 160 kb/s),
# 0.97 (192 kb/s) or 0.98 (224 kb/s) to leave headroom ("scaling" in
# lame --verbose); decoded, such a file is 0.45/0.26/0.18 dB below its
# source. --scale multiplies that factor, so 1/0.95 and 1/0.97 restore unity
# gain and the tests can hold the decoder to the source (see README.md).
LAME="lame --quiet --noreplaygain"
UNITY128="--scale 1.0526315789" # 1/0.95
UNITY192="--scale 1.0309278351" # 1/0.97
for check in "-b 128 $UNITY128" "-b 192 $UNITY192" "-V 2"; do
	# shellcheck disable=SC2086
	scaling=$(lame --verbose $check "$tmp/hot-s44.wav" "$tmp/check.mp3" 2>&1 | awk '$1 == "scaling:" {print $2}')
	case $scaling in 1 | 1.0000*) ;; *)
		echo "make-fixtures.sh: lame $check scales by $scaling, not 1" >&2
		exit 1
		;;
	esac
done

$LAME -b 128 $UNITY128 "$tmp/speech-m44.wav" speech-m44-128.mp3   # MPEG-1, mono, CBR 128 kb/s
$LAME -V 2 "$tmp/speech-m44.wav" speech-m44-v2.mp3      # MPEG-1, mono, VBR
$LAME -b 128 $UNITY128 "$tmp/music-s48.wav" music-s48-128.mp3     # MPEG-1, joint stereo, CBR 128 kb/s
$LAME -b 192 $UNITY192 "$tmp/music-s48.wav" music-s48-192.mp3     # MPEG-1, joint stereo, CBR 192 kb/s
$LAME -V 2 "$tmp/music-s48.wav" music-s48-v2.mp3        # MPEG-1, joint stereo, VBR
$LAME -b 128 $UNITY128 -m s "$tmp/hot-s44.wav" hot-s44-128.mp3    # near full scale: decoder clamps
# Tags: ID3v2 at the start and ID3v1 at the end (invented show and studio).
$LAME -b 64 $UNITY128 --add-id3v2 --pad-id3v2-size 300 --tt "Harbour Lights, episode 12" \
	--ta "Saltmarsh Audio Works" "$tmp/speech-2s.wav" tagged-id3v2-id3v1.mp3
$LAME -b 64 $UNITY128 -t "$tmp/speech-2s.wav" no-info-header.mp3  # -t: no Xing/Info frame
$LAME -b 64 $UNITY128 --resample 22.05 "$tmp/speech-2s.wav" mpeg2-22k.mp3   # MPEG-2 (LSF)
$LAME -b 16 --resample 8 "$tmp/speech-2s.wav" mpeg25-8k.mp3       # MPEG-2.5: rejected
$LAME --freeformat -b 200 "$tmp/speech-2s.wav" free-format.mp3  # bit-rate index 0: rejected
# Truncated: the 128 kb/s music file cut in the middle of a frame.
head -c 30001 music-s48-128.mp3 >truncated.mp3

ls -l ./*.mp3 ./*.flac
