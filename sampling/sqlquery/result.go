package sqlquery

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"

	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"probity/sampling/drawfolder"
)

// resultTable is a query result file read whole (it is as large as the
// sample, not the table): the header and each row with the line it starts
// on.
type resultTable struct {
	name   string
	header []string
	rows   [][]string
	lines  []int
}

// Columns of the result, by position (see ResultHeader).
const (
	colKind = iota
	colRecordID
	colStratum
	colStratumSize
	colStratumSample
	colStratumSpare
	colStratumRank
	colKey
	colDetail
	fixedColumns
)

// readResult reads a result file: CSV with a header, as psql --csv or
// COPY … CSV HEADER writes it (a UTF-8 byte-order mark and CRLF line ends
// are accepted).
func readResult(path string, data []byte) (*resultTable, error) {
	if len(bytes.TrimSpace(bytes.TrimPrefix(data, []byte("\xef\xbb\xbf")))) == 0 {
		return nil, &inputerr.Error{File: path, Msg: "the file is empty",
			Hint: "save the query's result with its header, e.g. psql --csv -f draw.sql > result.csv"}
	}
	ct, err := drawfolder.ParseCSVTable(data, path)
	if err != nil {
		var ie *inputerr.Error
		if errors.As(err, &ie) && ie.Line > 0 && ie.Err != nil {
			c := *ie
			c.Msg = "not a CSV result: " + c.Msg
			return nil, &c
		}
		return nil, err
	}
	t := &resultTable{name: path, header: ct.Header, rows: ct.Rows, lines: ct.Lines}
	want := ResultHeader(len(t.header) - fixedColumns)
	if len(t.header) < fixedColumns || strings.Join(t.header, ",") != strings.Join(want, ",") {
		return nil, &inputerr.Error{File: path, Line: 1,
			Msg:  fmt.Sprintf("the header is not that of a probity draw query (expected %s)", strings.Join(ResultHeader(0), ",")+",value_1,…"),
			Hint: "save the result of the drawing query probity printed, with its header"}
	}
	return t, nil
}

// rowError is an error about one field of one result row.
func (t *resultTable) rowError(i, col int, format string, args ...any) *inputerr.Error {
	return &inputerr.Error{File: t.name, Line: t.lines[i], Field: t.header[col], Msg: fmt.Sprintf(format, args...)}
}

// int64At parses an integer field (≥ 0).
func (t *resultTable) int64At(i, col int) (int64, error) {
	v := t.rows[i][col]
	n, err := strconv.ParseInt(v, 10, 64)
	if err != nil || n < 0 {
		return 0, t.rowError(i, col, "%q is not a non-negative integer", v)
	}
	return n, nil
}

// readFile returns a file's bytes, or stdin's for "-".
func readFile(path string, stdin io.Reader) ([]byte, error) {
	if path == "-" {
		return inputfile.ReadAll(stdin, "stdin", "query result", inputfile.TableLimit)
	}
	return inputfile.ReadFile(path, "query result", inputfile.TableLimit)
}
