// Package figure turns simulated images into files and figures: 8-bit grey
// PNGs with their conditions stored as text chunks, 32-bit float TIFFs that
// keep the intensities as numbers, and labelled figures (bright field and
// dark field side by side, a scale bar, the g arrow and the conditions).
//
// # Contrast mapping
//
// Intensities arrive as fractions of the incident beam intensity. [Mapping]
// turns them into 8-bit grey levels by a linear map followed by clamping and
// rounding to the nearest level:
//
//	fixed: q = I / Max                    (Max = 1 when zero)
//	auto:  q = (I − lo) / (hi − lo)       (lo, hi: the image's minimum and
//	                                        maximum, or its ClipPercent and
//	                                        100 − ClipPercent percentiles)
//	grey  = floor(255·clamp(q, 0, 1) + 0.5), then 255 − grey when Invert.
//
// The percentiles are those of the sorted finite values with linear
// interpolation between neighbouring ranks (the "linear" definition, type 7
// of Hyndman & Fan, "Sample quantiles in statistical packages", The American
// Statistician 50, 361 (1996)). An auto-mapped image never shows contrast
// that is not in its numbers: when its whole range (minimum to maximum)
// is below ContrastFloor, 1e-3 of the incident beam, it is drawn flat at
// the fixed grey of its middle value, and a clipped range narrower than
// the floor is widened to it about its middle. NaN maps to 0
// (black) and ±Inf clamp to the ends.
//
// # Files
//
// PNG text: the keyword/text pairs go into tEXt chunks (Latin-1) or, when a
// value holds a character outside Latin-1, into uncompressed iTXt chunks
// (UTF-8), inserted right after IHDR in keyword order, as laid down in the
// PNG specification (W3C Recommendation, Portable Network Graphics (PNG)
// Specification, 2nd edition, 2003, §11.3.4). Every chunk carries the CRC-32
// of its type and data (ISO 3309 / ITU-T V.42 polynomial, as in
// hash/crc32.IEEE).
//
// Float TIFF: a baseline TIFF 6.0 file (Adobe, TIFF Revision 6.0, 1992) with
// one 32-bit IEEE 754 sample per pixel (BitsPerSample 32, SampleFormat 3 =
// floating point, SamplesPerPixel 1, PhotometricInterpretation 1 =
// BlackIsZero), uncompressed, little-endian, in strips of about 64 KiB. The
// values are the intensities themselves, so an image tool shows the
// numbers the simulation produced.
//
// Every file is written atomically: into a temporary file in the target's
// directory, synced, then renamed over the target, so a failure part way
// leaves the old file as it was.
//
// # Figures
//
// [Pair] and [Single] draw on white: each panel is the grey image upscaled by
// an integer factor (nearest neighbour, so pixels stay pixels), framed by a
// thin black line and labelled above. Below the panels runs one strip with
// the scale bar on the left and the g arrow on the right, then the
// conditions. The scale bar length is the largest 1, 2 or 5 × 10^n nm not
// exceeding a third of the panel width, so it covers between 2/15 and 1/3
// of the panel (common practice: a bar about a fifth to a quarter of the
// field, with a round length). Text is set
// in the Go fonts (golang.org/x/image/font/gofont) at a size proportional to
// the figure width.
//
// Everything here is deterministic: the same input gives the same bytes.
package figure
