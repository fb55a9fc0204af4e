package drawfolder

import (
	"fmt"
	"slices"
	"strings"

	"probity/plan/inputerr"
)

// Unsure is the word a labeler writes in a label cell for an item they
// cannot decide. ParseLabel matches it in any case.
const Unsure = "unsure"

// LabelKind says what a label cell holds.
type LabelKind int

const (
	// LabelBlank is an empty cell, or one of spaces only: not labeled.
	LabelBlank LabelKind = iota
	// LabelClass is one of the plan's classes.
	LabelClass
	// LabelUnsure is the word unsure, in any case.
	LabelUnsure
	// LabelInvalid is anything else.
	LabelInvalid
)

// ParseLabel reads a label cell under the package's one rule (see the
// package comment): surrounding spaces are removed; an empty cell is
// blank; the word unsure in any case is unsure; a class must match one of
// classes exactly. It returns the label in its normal form — "" when
// blank, Unsure, or the class — and its kind. For an invalid cell the
// label is the cell without its surrounding spaces.
func ParseLabel(cell string, classes []string) (string, LabelKind) {
	l := strings.TrimSpace(cell)
	switch {
	case l == "":
		return "", LabelBlank
	case strings.EqualFold(l, Unsure):
		return Unsure, LabelUnsure
	case slices.Contains(classes, l):
		return l, LabelClass
	}
	return l, LabelInvalid
}

// RowLabel is ParseLabel on the label cell of r, a row of the worksheet
// file: an invalid cell is the error LabelError gives.
func RowLabel(file string, r WorksheetRow, classes []string) (string, LabelKind, error) {
	l, k := ParseLabel(r.Label, classes)
	if k == LabelInvalid {
		return l, k, LabelError(file, r, classes)
	}
	return l, k, nil
}

// LabelError is the one refusal of a label cell that is none of a class,
// blank or unsure: it names the file, the row's line, the label field and
// the item, and lists what the cell may hold.
func LabelError(file string, r WorksheetRow, classes []string) *inputerr.Error {
	list := strings.Join(classes, ", ")
	return inputerr.At(file, r.Line, "label", "label %q (item %d) is not one of the plan's classes (%s), blank or %q", r.Label, r.Item, list, Unsure).
		WithHint(fmt.Sprintf("use exactly one of: %s; leave the label blank or write %q when the item cannot be labeled", list, Unsure))
}
