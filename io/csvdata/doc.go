// Package csvdata reads correlogram exports, the input of dlsbatch, into
// dls.Measurement values, and writes files of the same format (for the
// simulator and for tests). This comment is the definition of the format.
//
// # The file
//
// A correlogram file is plain UTF-8 text. A UTF-8 byte order mark at the
// start is skipped; lines end in "\n" or "\r\n". A file with a NUL byte or
// bytes that are not UTF-8 (a spreadsheet workbook, a UTF-16 export) is
// rejected as not text, as is a line longer than 4 MiB, with one exception:
// a file whose first line that is not UTF-8 follows only ASCII lines is read
// as Windows-1252 (which includes the printable Latin-1 characters) from
// that line on, decoded with golang.org/x/text/encoding/charmap, when every
// line from there decodes without a control character or a byte the
// encoding leaves undefined; each measurement then carries a warning naming
// the line. In order, the file holds:
//
//  1. optional metadata lines, each "# key: value", or, without '#',
//     "key: value" or "key<TAB>value" with a key of the format (any other
//     line is taken for the header row; when it looks like "Key: value" the
//     error says so and suggests Options.SkipLines);
//  2. one header row naming the columns;
//  3. data rows of numbers, one per lag time.
//
// Options.SkipLines drops that many lines at the start without reading them
// (an instrument's preamble); line numbers still count them.
//
// Blank lines (nothing but spaces) are skipped everywhere, and so are data
// rows whose cells are all empty (",,,"). A line whose first non-space
// character is '#' is a comment line. A typical file:
//
//	# sample: LOT-0107
//	# temperature_c: 25.0
//	# wavelength_nm: 633
//	# angle_deg: 173
//	# solvent: water
//	tau_s,g2
//	5.0e-07,1.8861
//	1.0e-06,1.8843
//	...
//
// # Metadata lines
//
// A comment line before the header is a metadata line when the text after
// '#' up to its first ':' is, once trimmed, a key: one or more ASCII
// letters, digits, '_', '-' or '.'. Any other comment line ("# no colon",
// "# created 12:30") is only a comment. Keys are case-insensitive and
// stored in lower case; values are trimmed. The keys of the format, with
// the physically plausible range of each numeric one (dls.PlausibleRanges;
// bounds inclusive):
//
//	sample, run, solvent, lot, product, role, group    text
//	measured_at (ISO 8601, e.g. 2026-12-01T22:15:00Z)   text: the batch order
//	temperature_c               °C      -20 … 150 (and, where η or n comes
//	                                    from the solvent table, the range of
//	                                    the solvent's correlation)
//	wavelength_nm               nm      200 … 2000 (vacuum wavelength)
//	angle_deg                   °       5 … 179 (180 itself is no geometry)
//	viscosity_mpas              mPa·s   0.1 … 10⁴
//	refractive_index            1       1.0 … 2.5 (the medium's)
//	particle_ri                 1       real part 0.01 … 6 (metals below 1),
//	                                    imaginary part 0 … 10; or a material
//	concentration_mg_ml         mg/mL   0 … 1000
//	particle_density_g_cm3      g/cm³   0.1 … 22.6
//	volume_fraction             1       0 … 0.64
//	count_rate_kcps             kcps    0 … 10⁷
//	duration_s                  s       0 … 10⁵
//	medium_volume_fraction      1       0 … 0.6 (below φm = 0.63 of the
//	                                    viscosity relations)
//	medium_relative_viscosity   1       1 … 10⁴
//	kd                          1       -100 … 1000, or hard-sphere
//	u_viscosity_mpas            mPa·s   0 … 10⁴ (standard uncertainty of a
//	                                    given viscosity_mpas)
//	u_refractive_index          1       0 … 0.1 (of a given refractive_index)
//	u_kd                        1       0 … 1000 (of a numeric kd)
//	u_volume_fraction           1       0 … 0.64 (of the particles' φ)
//	u_medium_volume_fraction    1       0 … 0.6
//	u_medium_relative_viscosity 1       0 … 10⁴
//
// The reader checks syntax only. The analysis (dls/batch) checks each
// value, from whatever source, against its range: outside it the
// measurement fails with an error wrapping dls.ErrImplausible that names
// the key, the value, the range and where the value came from, unless
// implausible values are allowed (dlsbatch run --allow-implausible), when
// it is a warning instead.
//
// Each value goes into Measurement.Meta as a dls.Param with Origin
// dls.OriginFile and Where "file:line". The rules:
//
//   - sample, run, solvent, lot, product, role, group and kd (a number, or
//     hard-sphere) take any text here; the analysis checks kd.
//     particle_ri takes a complex number written as 1.59+0.0i (a real
//     number such as 1.59 is accepted) or the name of a material of the Mie
//     table (polystyrene, Au, …), evaluated at the measurement's wavelength.
//     Every other key takes a number (see Numbers below; 25.0, 633, 1e-3).
//     A value that breaks its rule makes the file fail with an error
//     wrapping dls.ErrBadMetadata, and the number's own sentinel, at that
//     line; the range check is left to the analysis.
//   - When numbers use a decimal comma (the delimiter is ';' or tab, or
//     Options.DecimalComma), a value of a numeric key, particle_ri or kd
//     with ',' and no '.' is read with ',' as its decimal mark and stored
//     with '.' ("# temperature_c: 25,0" is 25.0); errors quote the value as
//     written.
//   - count_rate_kcps and duration_s set the noise model of the Type A
//     uncertainty (the correlator's correlated channel noise): the mean
//     count rate the detector recorded (not one normalised for an
//     attenuator) and the duration of the run the column holds (not the
//     total of several runs).
//   - An empty value ("# viscosity_mpas:") gives no value, as if the line
//     were absent.
//   - A key that is not of the format is ignored, with a warning on the
//     measurement naming file and line (its error is dls.ErrUnknownMetadata).
//   - A key given twice: the later line wins, with a warning.
//   - A comment line after the header is ignored; when it looks like a
//     metadata line of a known key it draws a warning, since metadata must
//     come before the header.
//
// # The header row
//
// The first line that is neither blank nor a comment is the header row. Its
// cells are separated by ',' or ';' or a tab: the delimiter is the one of
// these that occurs most often in the header row outside double quotes (ties
// in that order, ',' when none occurs) unless Options.Comma names it. A cell
// is trimmed of surrounding spaces; a cell that starts with a double quote
// runs to the closing quote and may hold the delimiter ("" inside stands for
// one quote); quoted cells cannot span lines. Column names are compared
// without regard to ASCII case, and two cells with the same name are an
// error; cells with an empty name are unnamed columns, which are not read (a
// trailing delimiter on every line is harmless). A header row made only of
// numbers is reported as a missing header.
//
// The columns of the format:
//
//	tau_s | tau_ms | tau_us      lag time in s, ms or µs; exactly one
//	g2                           normalised intensity autocorrelation (baseline ≈ 1)
//	g2m1                         g2 − 1 (baseline ≈ 0)
//	g1                           field autocorrelation
//	sigma                        standard uncertainty of each correlation value
//
// A g2 column exported without normalisation (a raw G2 = B·(1 + β·g1²) in
// counts², far channels above 10) is recognised by the analysis: with a
// clear baseline plateau it is divided by its far-channel mean, with a
// warning; without one the measurement fails (dls.ErrUnnormalised) with a
// message that says how to normalise the export (dls/batch).
//
// A file holds one run (one correlation column, "g2", "g2m1" or "g1") or
// several: correlation columns of one kind named "<kind>_<label>" (g2_a,
// g2_b, …) sharing the lag column, each with an optional "sigma_<label>".
// Each correlation column is one measurement whose Run is its label; an
// unlabelled column (which may stand beside labelled ones) has the label
// "". A plain "sigma" belongs to the unlabelled column and "sigma_<label>"
// to "<kind>_<label>"; a sigma column without its correlation column, two
// lag columns or correlation columns of two kinds are errors. Other columns
// are not read, with a warning listing them.
//
// The run label: a labelled column's label is its run label, also stored
// as the "run" metadata value (Where is the header line). A "# run: x" line
// names the run of an unlabelled column; for a labelled column the column
// label wins and the measurement carries a warning that "x" was replaced.
//
// # Foreign exports
//
// An export whose columns have other names is read by naming them in
// Options: TauColumn with TauUnit (the unit may instead be carried by the
// name: a trailing "(ms)", "[µs]" or a last word after '_' or ' ' of s, sec,
// ms, msec, us, µs, μs or usec), CorrColumns with CorrKind (inferred only
// from names of the format), and SigmaColumn. Named columns are matched
// trimmed and case-insensitively. With one correlation column the run label
// is "" (or the label of a "<kind>_<label>" name); with several, each run is
// labelled by its label of the format or else by its column name. Unnamed
// roles are still found by the names of the format, and other columns are
// not read or checked (they may hold text).
//
// # Data rows
//
// Every data row has as many cells as the header row. The cells of the lag,
// correlation and sigma columns hold numbers (see Numbers below). When the
// delimiter is not ',' (or with Options.DecimalComma, for quoted cells), a
// cell with exactly one ',' and no '.' uses the comma as its decimal mark
// ("1,5" in a ';' export is 1.5).
// Lags are converted to seconds by dividing by 1e3 (ms) or 1e6 (µs), one
// correctly rounded operation; they must be positive and strictly
// increasing. Sigma values must be positive.
//
// A file must have at least MinPoints (8) data rows.
//
// # Numbers
//
// Data cells and numeric metadata values are read by dls.ParseNumber, the
// one number reader of dlsbatch: decimal digits with an optional sign
// ('+' or '-'), an optional decimal point and an optional exponent, such
// as 25, -1.5e-3, .5, 5. or +1.0E+00, and nothing else. Go's digit
// separators (1_0), hexadecimal (0x1p0), inf, infinity and nan, and spaces
// inside a number, are rejected, although strconv.ParseFloat would read
// each. A number too large for float64 (1e999) fails with
// dls.ErrNonFinite, like the spellings of infinity and NaN; a non-zero
// number too small for it, which would round to 0 (1e-400), fails with
// dls.ErrOutOfRange. The complex particle_ri is read by
// dls.ParseComplexNumber: parts of the same syntax, as a, a+bi, a-bi or bi,
// optionally in parentheses.
//
// # Errors
//
// Read never panics and never stops a batch: each file gives at least one
// Entry, and each failure is a *dls.PosError whose Line is the 1-based line
// of the fault (0 when it concerns the whole file, such as an empty one)
// and whose Column is the 1-based cell of the row, 0 when no single cell is
// at fault (metadata lines, the header row as a whole). Column counts cells,
// not characters. The error wraps a sentinel for errors.Is:
//
//	dls.ErrEmpty          no bytes, or only blank and comment lines
//	dls.ErrNotText        NUL bytes, neither UTF-8 nor Windows-1252, UTF-16,
//	                      a line over 4 MiB
//	dls.ErrBadHeader      missing header, no lag or no correlation column (the
//	                      message lists the names found and those expected), a
//	                      repeated name, two kinds, a sigma without its run
//	dls.ErrBadMetadata    a metadata value that breaks its rule
//	ErrCellCount          a row with the wrong number of cells
//	dls.ErrMissingValue   an empty cell in a column that is read
//	dls.ErrNotANumber     a cell that is not a number (with its *dls.NumberError)
//	dls.ErrNonFinite      NaN, Inf, or a number too large for float64
//	dls.ErrBadLag         a lag that is not positive or does not increase
//	dls.ErrOutOfRange     a sigma that is not positive; a number that
//	                      underflows float64 (with its *dls.NumberError)
//	dls.ErrTooFewPoints   fewer than MinPoints data rows
//	ErrBadOptions         Options no file can be read with
//
// Which runs fail: a problem with the lag column, the row structure, the
// text, the header or the metadata fails every run of the file (one Entry
// per run when the header could be read, else one Entry for the file). A bad
// correlation or sigma value fails only its own run; the other runs of the
// file are read in full.
//
// Messages quote input text only as a short escaped excerpt of the cell at
// fault (io/safetext.Excerpt: at most 40 characters), and a warning that
// recurs in a file (a repeated or unknown metadata key, metadata after the
// header) is given once, for its first line, with the number of further
// lines like it.
//
// # Writing
//
// Write produces this format with ',' as delimiter, '\n' line ends, lags as
// %.6e in the unit asked for, correlation values as %.7f and sigma as
// %.6e, so that its output reads back to the same values within half a unit
// of the last written digit.
//
// # Finding files
//
// Discover turns command-line paths into the sorted, duplicate-free list of
// files to read: files as given, folders searched for *.csv in any letter
// case, skipping hidden folders and files. A folder named through a link is
// searched; inside a folder, links to files are followed and links to
// folders are not. Every path that cannot be read (missing, a link that
// cannot be followed, a file or folder that cannot be opened, a named pipe
// or device) is returned as a failed Entry, which the run reports as a
// result with status error.
//
// References:
//   - Y. Shafranovich, Common Format and MIME Type for Comma-Separated Values
//     (CSV) Files, RFC 4180, IETF, 2005 (the quoting rules).
//   - F. Yergeau, UTF-8, a transformation format of ISO 10646, RFC 3629,
//     IETF, 2003.
//   - BIPM, The International System of Units (SI), 9th edition, 2019 (the
//     prefixes m and µ).
package csvdata
