package ledger

import (
	"bytes"
	"strings"
)

// appendCSV appends cells to b as one comma-separated line without its
// line end. A cell is quoted when it holds a comma or a double quote, and a
// double quote inside it is doubled (RFC 4180); no other cell is quoted.
// Cells never hold line breaks (Row.check refuses them).
func appendCSV(b []byte, cells []string) []byte {
	for i, c := range cells {
		if i > 0 {
			b = append(b, ',')
		}
		if !strings.ContainsAny(c, `,"`) {
			b = append(b, c...)
			continue
		}
		b = append(b, '"')
		b = append(b, strings.ReplaceAll(c, `"`, `""`)...)
		b = append(b, '"')
	}
	return b
}

// csvSyntaxError is a fault in the quoting of one line: the cell at fault
// (0-based) and why.
type csvSyntaxError struct {
	cell int
	why  string
}

// splitCSV splits one line (without its line end) into cells. It accepts
// RFC 4180 quoting: a quoted cell may hold commas and doubled quotes; an
// unquoted cell may hold no quote at all.
func splitCSV(line []byte) ([]string, *csvSyntaxError) {
	var cells []string
	for i := 0; ; {
		n := len(cells)
		if i < len(line) && line[i] == '"' {
			var sb strings.Builder
			i++
			for {
				j := bytes.IndexByte(line[i:], '"')
				if j < 0 {
					return cells, &csvSyntaxError{n, "quoted cell has no closing quote"}
				}
				sb.Write(line[i : i+j])
				i += j + 1
				if i < len(line) && line[i] == '"' {
					sb.WriteByte('"')
					i++
					continue
				}
				break
			}
			cells = append(cells, sb.String())
			if i == len(line) {
				return cells, nil
			}
			if line[i] != ',' {
				return cells, &csvSyntaxError{n, "text follows the closing quote"}
			}
			i++
			continue
		}
		j := bytes.IndexByte(line[i:], ',')
		end := i + j
		if j < 0 {
			end = len(line)
		}
		cell := line[i:end]
		if bytes.IndexByte(cell, '"') >= 0 {
			return cells, &csvSyntaxError{n, "quote inside an unquoted cell"}
		}
		cells = append(cells, string(cell))
		if j < 0 {
			return cells, nil
		}
		i = end + 1
	}
}
