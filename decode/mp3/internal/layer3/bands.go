package layer3

// Scale-factor band boundaries, in spectral lines (ISO/IEC 11172-3 Table
// 3-B.8 for 44.1, 48 and 32 kHz; ISO/IEC 13818-3 Table B.2 for 22.05, 24
// and 16 kHz; the MPEG-2.5 rates use the 16 kHz tables at 11.025 and 12
// kHz and their own at 8 kHz, which no ISO document defines) [memory].
// One boundary is not the same in every decoder: at 24 kHz band 18
// starts at line 332 here and in lame's decoder, at 330 in ffmpeg's (the
// differential tests found it: the difference sits at 6.9 kHz). 332 is
// what lame's encoder uses: decoded with it, its streams are closer to
// their source in those lines (TestBand24kFromSource).
// TestBandTables checks that each long table ends at 576 and each short
// one at 192 and that the widths never shrink by more than the tables'
// own shape allows; TestGranuleBitsFromLame uses them for the Huffman
// region boundaries, which misplaced bands would break.
var longBands = [9][23]int{
	{0, 4, 8, 12, 16, 20, 24, 30, 36, 44, 52, 62, 74, 90, 110, 134, 162, 196, 238, 288, 342, 418, 576},
	{0, 4, 8, 12, 16, 20, 24, 30, 36, 42, 50, 60, 72, 88, 106, 128, 156, 190, 230, 276, 330, 384, 576},
	{0, 4, 8, 12, 16, 20, 24, 30, 36, 44, 54, 66, 82, 102, 126, 156, 194, 240, 296, 364, 448, 550, 576},
	{0, 6, 12, 18, 24, 30, 36, 44, 54, 66, 80, 96, 116, 140, 168, 200, 238, 284, 336, 396, 464, 522, 576},
	{0, 6, 12, 18, 24, 30, 36, 44, 54, 66, 80, 96, 114, 136, 162, 194, 232, 278, 332, 394, 464, 540, 576},
	{0, 6, 12, 18, 24, 30, 36, 44, 54, 66, 80, 96, 116, 140, 168, 200, 238, 284, 336, 396, 464, 522, 576},
	{0, 6, 12, 18, 24, 30, 36, 44, 54, 66, 80, 96, 116, 140, 168, 200, 238, 284, 336, 396, 464, 522, 576},
	{0, 6, 12, 18, 24, 30, 36, 44, 54, 66, 80, 96, 116, 140, 168, 200, 238, 284, 336, 396, 464, 522, 576},
	{0, 12, 24, 36, 48, 60, 72, 88, 108, 132, 160, 192, 232, 280, 336, 400, 476, 566, 568, 570, 572, 574, 576},
}

// shortBands are the boundaries of the 13 short-block bands, in lines of
// one window (192 per window).
var shortBands = [9][14]int{
	{0, 4, 8, 12, 16, 22, 30, 40, 52, 66, 84, 106, 136, 192},
	{0, 4, 8, 12, 16, 22, 28, 38, 50, 64, 80, 100, 126, 192},
	{0, 4, 8, 12, 16, 22, 30, 42, 58, 78, 104, 138, 180, 192},
	{0, 4, 8, 12, 18, 24, 32, 42, 56, 74, 100, 132, 174, 192},
	{0, 4, 8, 12, 18, 26, 36, 48, 62, 80, 104, 136, 180, 192},
	{0, 4, 8, 12, 18, 26, 36, 48, 62, 80, 104, 134, 174, 192},
	{0, 4, 8, 12, 18, 26, 36, 48, 62, 80, 104, 134, 174, 192},
	{0, 4, 8, 12, 18, 26, 36, 48, 62, 80, 104, 134, 174, 192},
	{0, 8, 16, 24, 36, 52, 72, 96, 124, 160, 162, 164, 166, 192},
}
