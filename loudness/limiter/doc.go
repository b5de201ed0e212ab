// Package limiter is kweigh's true-peak limiter: a look-ahead peak limiter
// whose detector sees the inter-sample peaks of ITU-R BS.1770 Annex 2, so
// that a file it has processed measures at or below the ceiling on a
// BS.1770 true-peak meter. It is a kernel of the loudness family: plain
// interleaved float64 slices, built once per stream, Reset to reuse, no
// allocation per block, and a plain reference implementation in its tests.
//
// # Signal path
//
// For every input frame n the detector takes, on each channel, the largest
// magnitude among the sample itself and the Annex 2 interpolated values of
// the 12-sample window ending at n, 4× at every rate (loudness.NewTruePeak4x:
// finer than the meter's 2× at 88.2/96 kHz and 1× from 176.4 kHz, so the
// limiter never reads a peak lower than the meter does), and the largest
// over all channels, d[n]: the channels are linked, one gain for all, so
// that the stereo or surround image does not move when one channel peaks. The gain that window needs is
//
//	r[n] = min(1, c / d[n])      c = 10^((ceiling − margin)/20)
//
// and, since the window's interpolated values depend on all 12 of its
// samples, r[n] must hold for every one of them. Three steps turn r into
// the applied gain G, with the audio delayed by D = A + 10 frames (A is the
// look-ahead in frames):
//
//	h[n]   = min r[n−H+1 … n]                     hold, H = D + 1 + hold frames
//	e[n]   = h[n]                        if h[n] ≤ e[n−1]   (attack: follow down at once)
//	e[n]   = h[n] − (h[n] − e[n−1])·a    otherwise          (release, a = exp(−1/(τ·fs)))
//	G[n]   = (1/A) Σ e[n−A+1 … n]                    smoothing over the look-ahead
//	y[n]   = G[n] · x[n − D]
//
// Every term of the average that makes G at the output time of a sample in
// a peak's window is at most that window's r (h holds it for H ≥ D+1
// frames), so G never exceeds what a peak needs: the limiter does not
// overshoot by design, not by clipping. Around a peak that is a local
// minimum of r the A-frame average covers only held values, so the gain is
// constant across that window's 12 samples and its interpolated values are
// exactly r·(those of the input) ≤ c. The remaining error, from gain that
// still moves across a window that is not the loudest, is covered by the
// safety margin (default 0.1 dB).
//
// # Smoothness
//
// The attack is a linear ramp over the look-ahead (the box average of a
// step), the release exponential with time constant τ (default 100 ms,
// within the 50–200 ms usual for programme limiters). From one sample to the
// next G changes by (e[n] − e[n−A])/A, so
//
//	|G[n] − G[n−1]| ≤ (1 − Gmin)/A
//
// where Gmin is the lowest gain applied (at most 1/A for any signal; with
// the default 2 ms look-ahead at 48 kHz and 6 dB of reduction, 0.0052 per
// sample). Audio whose detected peaks stay at or below c passes with G = 1
// exactly: delayed by D frames and otherwise bit for bit unchanged.
package limiter
