package sampling

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"probity/plan/inputerr"
	"strconv"
)

// csvTable is a small CSV file read whole: the header and the rows, each
// with the 1-based line it starts on. It is used for the draw folder's own
// files (ledger, worksheets), which are as large as the sample, not the log.
type csvTable struct {
	name   string
	header []string
	rows   [][]string
	lines  []int
}

// readCSVTable reads a CSV file with a header line. A UTF-8 byte-order mark
// (added by some spreadsheet programs) is ignored, as are CRLF line ends.
// Every row must have as many fields as the header.
func readCSVTable(path string) (*csvTable, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, inputerr.FromPath(err)
	}
	return parseCSVTable(data, path)
}

// CSVTable is a small CSV file with a header line, read whole: what
// ParseCSVTable returns to callers outside this package (a query result,
// an adjudication file). Lines[i] is the 1-based line Rows[i] starts on.
type CSVTable struct {
	Header []string
	Rows   [][]string
	Lines  []int
}

// ParseCSVTable parses a small CSV file with a header line, as the draw
// folder's own files are read: a UTF-8 byte-order mark and CRLF line ends
// are accepted, every row must have as many fields as the header, and an
// empty file is an error. Errors are *inputerr.Error values naming name and
// the line.
func ParseCSVTable(data []byte, name string) (*CSVTable, error) {
	t, err := parseCSVTable(data, name)
	if err != nil {
		return nil, err
	}
	return &CSVTable{Header: t.header, Rows: t.rows, Lines: t.lines}, nil
}

// parseCSVTable is readCSVTable on bytes already read.
func parseCSVTable(data []byte, name string) (*csvTable, error) {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	r := csv.NewReader(bytes.NewReader(data))
	r.FieldsPerRecord = -1
	t := &csvTable{name: name}
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return nil, &inputerr.Error{File: name, Line: pe.Line, Msg: pe.Err.Error(), Err: err}
			}
			return nil, &inputerr.Error{File: name, Msg: err.Error(), Err: err}
		}
		line, _ := r.FieldPos(0)
		if t.header == nil {
			t.header = rec
			continue
		}
		if len(rec) != len(t.header) {
			return nil, inputErrorf(name, line, "", "%d fields, but the header has %d", len(rec), len(t.header))
		}
		t.rows = append(t.rows, rec)
		t.lines = append(t.lines, line)
	}
	if t.header == nil {
		return nil, inputErrorf(name, 0, "", "the file is empty (no header line)")
	}
	return t, nil
}

// checkHeader compares a header with the expected column names.
func checkHeader(name string, got, want []string) error {
	if len(got) != len(want) {
		return inputErrorf(name, 1, "", "header has %d columns, expected %d: %s", len(got), len(want), columnList(want))
	}
	for i := range want {
		if got[i] != want[i] {
			return inputErrorf(name, 1, "", "header column %d is %q, expected %q (expected columns: %s)", i+1, got[i], want[i], columnList(want))
		}
	}
	return nil
}

// parseItem parses a 1-based item number.
func parseItem(name string, line int, column, v string) (int, error) {
	n, err := strconv.Atoi(v)
	if err != nil || n < 1 {
		return 0, inputErrorf(name, line, column, "%q is not a positive whole number", v)
	}
	return n, nil
}

// parseBool parses "true" or "false".
func parseBool(name string, line int, column, v string) (bool, error) {
	switch v {
	case "true":
		return true, nil
	case "false":
		return false, nil
	}
	return false, inputErrorf(name, line, column, "%q is neither true nor false", v)
}

// formatFloat is the one float format of the draw folder's CSV files: the
// shortest decimal that reads back to the same float64, never an exponent.
func formatFloat(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

// formatBool writes true or false.
func formatBool(b bool) string {
	if b {
		return "true"
	}
	return "false"
}

// isKey reports whether s is 64 lowercase hex digits.
func isKey(s string) bool {
	if len(s) != 64 {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !(c >= '0' && c <= '9' || c >= 'a' && c <= 'f') {
			return false
		}
	}
	return true
}

// writeCSV writes rows with "\n" line ends and encoding/csv's quoting.
func writeCSV(w io.Writer, rows [][]string) error {
	cw := csv.NewWriter(w)
	if err := cw.WriteAll(rows); err != nil {
		return fmt.Errorf("writing CSV: %w", err)
	}
	return nil
}
