package main

import (
	"bytes"
	"io"
	"strings"
	"unicode/utf8"

	"github.com/spf13/cobra"
)

// fitWriter passes a command's console output on with every line longer
// than width columns broken at a space, the rest indented under the
// line's own indent, so reports fit a terminal of width columns. Machine
// output (--json, the query of --sql) passes unchanged: a command sets raw
// for it before it writes (see machineOutput).
type fitWriter struct {
	w     io.Writer
	width int
	raw   bool
	line  []byte
}

// Write buffers p up to each line end and writes the fitted lines.
func (f *fitWriter) Write(p []byte) (int, error) {
	if f.raw {
		return f.w.Write(p)
	}
	for rest := p; len(rest) > 0; {
		i := bytes.IndexByte(rest, '\n')
		if i < 0 {
			f.line = append(f.line, rest...)
			break
		}
		f.line = append(f.line, rest[:i]...)
		if err := f.emit(string(f.line), true); err != nil {
			return 0, err
		}
		f.line = f.line[:0]
		rest = rest[i+1:]
	}
	return len(p), nil
}

// Flush writes what is left of a last line without a line end.
func (f *fitWriter) Flush() error {
	if len(f.line) == 0 {
		return nil
	}
	err := f.emit(string(f.line), false)
	f.line = f.line[:0]
	return err
}

// emit writes one line, broken to fit.
func (f *fitWriter) emit(line string, eol bool) error {
	var b strings.Builder
	indent := len(line) - len(strings.TrimLeft(line, " "))
	cont := strings.Repeat(" ", min(indent+4, f.width/3))
	for utf8.RuneCountInString(line) > f.width {
		cut := breakAt(line, f.width, indent)
		if cut < 0 {
			break
		}
		b.WriteString(strings.TrimRight(line[:cut], " "))
		b.WriteByte('\n')
		line = cont + strings.TrimLeft(line[cut:], " ")
		indent = len(cont)
	}
	b.WriteString(line)
	if eol {
		b.WriteByte('\n')
	}
	_, err := io.WriteString(f.w, b.String())
	return err
}

// breakAt is the byte index of the last space within the first width
// columns of line and after its indent (-1 when there is none); a space
// before a dash (" — ", which joins a reason to a result) is preferred
// when it lies in the second half of the line.
func breakAt(line string, width, indent int) int {
	cut, dash, col := -1, -1, 0
	prev := rune(0)
	for i, r := range line {
		if col >= width {
			break
		}
		if r == ' ' && i > indent {
			cut = i
		}
		if r == '—' && prev == ' ' && i-1 > indent && col > width/2 {
			dash = i - 1
		}
		prev = r
		col++
	}
	if dash >= 0 {
		return dash
	}
	return cut
}

// machineOutput reports whether the command about to run prints for
// programs rather than people: a JSON object (--json) or a query (--sql).
func machineOutput(c *cobra.Command) bool {
	for _, name := range []string{"json", "sql"} {
		if fl := c.Flags().Lookup(name); fl != nil && fl.Changed && fl.Value.String() != "false" {
			return true
		}
	}
	return false
}
