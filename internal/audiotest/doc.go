// Package audiotest is test support shared by kweigh's packages — not
// imported by non-test code.
//
// It holds what the decoder and engine tests would otherwise each carry a
// copy of: the CPU-time clocks and the multiple-of-real-time metrics the
// benchmarks report ("x-realtime" by wall clock, "x-realtime-cpu" by CPU
// time), a plain reader for the PCM WAV files fixtures are made from
// (Microsoft RIFF/WAVE) and a writer to build small ones in tests (PCMWAV,
// Sine), and helpers that read a decoder to its end.
//
// It imports package decode only, never a format sub-package nor loudness,
// so that the in-package tests of every one of them can import it without
// an import cycle; a test that decodes through the registry imports the
// formats it needs itself.
package audiotest
