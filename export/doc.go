// Package export turns a simulated scene into the files a user keeps: the
// bright-field and dark-field images as 8-bit PNG and 32-bit float TIFF,
// the labelled figure, and line profiles as CSV. The command line and the
// desktop program both call it, so the files they write are the same.
package export
