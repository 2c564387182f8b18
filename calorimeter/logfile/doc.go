// Package logfile reads the temperature logs that calorimeter
// thermometers, data loggers and spreadsheets export, and summarises them.
//
// Read takes delimited text and returns a Log: elapsed time in seconds
// from the first reading, temperature in kelvin, the source line of each
// reading, any other numeric columns, and the "# key: value" metadata at
// the top. Summarise and Summary.WriteText describe what was found, for
// `calred inspect`. The package imports only the standard library.
//
// # Reading
//
// Read sniffs the dialect from the first 48 lines of text (blank and
// comment lines not counted, 512 lines at most), then streams the rest line
// by line: memory grows with the readings, not with the file.
//
// # Accepted dialects
//
// Encoding: UTF-8, with or without a byte order mark; UTF-16 (little or big
// endian) with a byte order mark, as spreadsheets write "Unicode text";
// header and comment lines that are not valid UTF-8 are read as ISO 8859-1
// (Latin-1), so a degree sign written as the byte 0xB0 is understood.
// Lines end with LF, CRLF or a lone CR.
//
// Delimiter: comma, semicolon, tab, pipe, or runs of spaces and tabs. The
// delimiter chosen is the one that gives the most data lines with the same
// number of fields (a data line has two values or more, and values make at
// least half of its filled cells); on a tie tab, semicolon, comma, pipe and
// spaces are preferred in that order. Fields may be quoted with double
// quotes ("" for a quote inside). With spaces as the delimiter a blank cell
// cannot be written, and a date followed by a time of day
// (2026-03-04 10:15:02) stays one field.
//
// Decimal mark: with a comma delimiter the mark is a point. Otherwise a
// comma inside a number is a decimal comma: the mark used by more numbers
// in the sniffed lines wins, and when they show none (or as many of each)
// the first number written with a mark decides. A number written with the
// other mark is an error: a comma is never dropped, so 9,99 is 9.99 or a
// ParseError, never 999. Numbers are plain decimals with an optional
// exponent; hexadecimal, "inf" and "nan" are refused.
//
// Preamble and header: lines of text above the header (instrument name,
// serial number, export date) are skipped. The header is the nearest line
// above the first data line whose cells read as names (starting with a
// letter) rather than values; a header may also be written as the last
// comment line above the data ("#  t/s  T/K") if it names a time or a
// temperature. Without a header, the columns are taken by position with a
// warning. Data lines may carry trailing delimiters the header lacks.
//
// Comments: lines starting with '#' are skipped anywhere. Above the first
// data line, "# key: value" comments are metadata: the key in lower case
// with '_' and blanks turned to '-' ("# Sample mass: 2.503 g" gives
// "sample-mass"); a key given twice keeps its first value, with a warning.
//
// Units in the header: in parentheses or brackets, after a slash, after
// "in", or after a blank or underscore when the name already says time or
// temperature: "Temperature (°C)", "T/K", "time [min]", "Temp[degC]",
// "t (s)", "Zeit in s", "Temp_C". Temperature units: °C (also ºC, ℃, degC,
// deg C, Celsius, C), K (kelvin), °F (degF, Fahrenheit, F). Time units:
// s, min, h, ms, mm:ss, hh:mm:ss, hh:mm, iso8601, with common spellings.
// A temperature column without a unit is taken as °C with a warning; a
// numeric time column without a unit as seconds with a warning. A unit in
// Options overrides the header (with a warning when they differ).
//
// Columns: Options name the time and temperature columns by header text,
// name or 1-based number. Otherwise the time column is the one whose unit
// is a time unit or whose name says time (time, t, elapsed, clock,
// timestamp, datetime, zeit, uhrzeit, …), and the temperature column the one
// whose unit is a temperature unit or whose name says temperature
// (temperature, temp, T, θ, theta, T1, …). When several qualify the first is
// taken, with a warning; when none does, the first column holding clock
// times or timestamps, else the first numeric column, is time, and the next
// numeric column is temperature, with a warning. Other numeric columns go
// to Log.Extra by name, as written (not converted), NaN where blank;
// columns holding text are "ignored".
//
// Time: numbers in s, min, h or ms; mm:ss timers (minutes may pass 59);
// clock times hh:mm:ss or hh:mm with an optional fraction, where a clock
// that goes back by more than 12 h has passed midnight and gains 24 h; ISO
// 8601 date and time, with T or a space, optional seconds and fraction, and
// Z, ±hh, ±hhmm or ±hh:mm. Timestamps with an offset are compared in UTC, so
// a change of offset (summer time) is harmless; timestamps without one are
// taken as written. All become seconds since the first reading.
//
// Temperature becomes kelvin:
//
//	T/K = t/°C + 273.15
//	T/K = (t/°F − 32)·5/9 + 273.15
//
// (ITS-90 and the definition of the Fahrenheit scale; NIST SP 811, B.8).
//
// # Errors and warnings
//
// A blank time or temperature cell is a missing reading: the row is
// skipped with a Warning naming its line (the first 20 are listed, then a
// count). A row whose cells are all empty is skipped silently. Anything else
// that cannot be read is a *ParseError with the file, line and field: a
// cell that is not a number, clock time or timestamp as its column needs, a
// wrong number of fields, an unclosed quote, a time earlier than the
// reading before (equal times are kept and listed by Summarise), a
// temperature below 0 K or above 10 000 K (no calorimeter reads that: a
// wrong unit or a corrupt cell), a unit that is not understood, a file without
// readings. I/O errors come wrapped in a *ParseError too. Only errors in
// Options themselves (see Options.Validate) are plain errors.
package logfile
