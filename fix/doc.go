// Package fix brings a delivered file to its delivery spec and proves it:
// it measures and judges the file (packages measure and rules), works out
// the gain that puts integrated loudness on the spec's aim, runs the
// true-peak limiter of package loudness/limiter when that gain would push
// the true peak over the ceiling, iterates the gain (at most a few passes)
// because limiting lowers the loudness a little, writes the corrected file
// in the input's own format, and then measures and judges what it wrote
// with the same code. The Record it returns holds both judgements.
//
// It is a package of its own because writing corrected audio has no other
// home: package decode only reads, package reports only writes reports, and
// package loudness knows nothing of files.
//
// Outputs keep the input's container, sample rate, channel count and sample
// format. WAV, BWF, RF64/BW64 and AIFF/AIFF-C are rewritten in place of
// their audio bytes only, so every other chunk (bext, iXML, LIST, cue …) is
// kept byte for byte, except the bext loudness fields (EBU Tech 3285 v2),
// which are set to the output's measured values. Integer PCM gets TPDF
// dither at the output word length; float stays float. FLAC is re-encoded
// with github.com/mewkiz/flac's encoder and verified (every frame decodes,
// the MD5 of the decoded audio equals the MD5 of what was encoded). MP3 is
// re-encoded with Debian's lame when it is on PATH, and accepted only if the
// encoded file passes; otherwise a WAV is written for the user to encode.
package fix
