// Package micrograph reads recorded micrographs and places them on the
// specimen: the reading half of matching a simulation to an experiment.
//
// [Read] takes a file path (a "#N" suffix picks image N of a stack,
// counted from 0) and returns an [Image]: float32 grey values, the pixel
// size in nm where the file records it (and where it was found), the
// format, the kind of samples, and what the file says about the
// acquisition (voltage, magnification or camera length, date, which image
// of a stack). The format is told from the content, not the name.
//
// # Formats
//
//   - PNG and JPEG (image/png, image/jpeg): 8- or 16-bit grey, colour as
//     its luminance. No calibration: the pixel size must be given.
//   - TIFF (Adobe, TIFF Revision 6.0, 1992): 8- and 16-bit unsigned grey
//     through golang.org/x/image/tiff, 32-bit IEEE float through the
//     project's own reader (figure.ReadFloatTIFF). The pixel size comes
//     from an ImageJ-style ImageDescription ("ImageJ=…" then key=value
//     lines: unit=nm with XResolution in pixels per unit, or "spacing"
//     when there is no XResolution), else from the resolution tags
//     (XResolution pixels per ResolutionUnit, 2 = inch, 3 = cm). A
//     resolution-tag pixel size of 1 µm or more (below about 25 400 dpi)
//     is a print resolution, not a calibration, and is not used.
//   - MRC 2014: the format of the CCP-EM community, as laid down in
//     A. Cheng et al., "MRC2014: Extensions to the MRC format header for
//     electron cryo-microscopy and tomography", J. Struct. Biol. 192,
//     146–150 (2015). A 1024-byte header (NX, NY, NZ, MODE at words 1–4;
//     MX at word 8; CELLA at words 11–13 in Å; NSYMBT at word 24; "MAP "
//     at byte 208; the machine stamp at byte 212), NSYMBT bytes of
//     extended header, then the sections. Modes 0 (int8), 1 (int16),
//     2 (float32), 6 (uint16) and 12 (IEEE binary16). Pixel size
//     CELLA.X / MX Å.
//   - DM3 and DM4, the tagged files of the Gatan Microscopy Suite, read
//     from the published description of the tag format: G. Jefferis, "DM3
//     Image Format" (after the EMAN project; ImageJ web site,
//     imagej.net/ij/plugins/DM3Format.gj.html) for the tag groups, tag
//     entries and encoded types, and C. Boothroyd, "Digital Micrograph
//     file format" (Nanyang Technological University) for DM4, which
//     widens the header's root length, every count and every encoded-type
//     word to 8 bytes and puts an 8-byte size before each tag's content.
//     The structure is big-endian; the values follow the header's byte
//     order flag. The image read is the largest 2-D one under ImageList
//     (ImageData: Data, DataType, Dimensions); data types int8 to int32,
//     uint8 to uint32, float32, float64, binary, and RGB (converted to
//     grey as 0.299 R + 0.587 G + 0.114 B, the ITU-R BT.601 luma, with a
//     notice). The spatial calibration (Calibrations/Dimension: Scale,
//     Units, Origin; a coordinate is Scale·(i − Origin) in Units) is
//     converted to nm; ImageTags/Microscope Info gives the voltage (V),
//     the magnification and the STEM camera length (mm), and
//     ImageTags/DataBar the acquisition date and time.
//
// Units of length are converted to nm from pm, Å, nm, µm (also written
// um or micron), mm, cm and m; any other unit is an error that names it.
//
// # Limits and errors
//
// An image larger than [MaxSide] pixels on a side is refused before
// anything is allocated for it, as is a header whose data would run past
// the end of the file. Every error about a file's content matches
// [ErrInvalid] and is one line naming the file and what is wrong: a
// truncated file, a DM file without a 2-D image, an unknown MRC mode, a
// TIFF compression this package does not read, a unit it cannot convert.
//
// # Placement
//
// [Placement] puts a micrograph on the specimen in the simulation's image
// frame: its pixel size, the direction of g in it, and the offset of its
// centre. Its g is turned to point right, as in every simulated image, by
// a rotation (never a mirror).
package micrograph
