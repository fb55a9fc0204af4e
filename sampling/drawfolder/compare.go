package drawfolder

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"probity/plan/chrono"
	"probity/plan/inputfile"
)

// Comparison is the outcome of comparing a draw folder with a fresh draw
// from the same plan and log.
type Comparison struct {
	// Differences are the findings, in a fixed order: manifest fields,
	// then the ledger, then the worksheets. Empty means the folder holds
	// exactly what chance picked.
	Differences []string
	// Items and Spares count the recomputed sample.
	Items, Spares int
	// Notes say what is not a difference but worth knowing: a log
	// compressed again since the draw.
	Notes []string
}

// maxListed bounds the differences listed per file.
const maxListed = 20

// Compare compares the draw folder in dir with want, a draw just
// recomputed from the plan and the log. The labels, notes and labelers a
// worksheet has gained since the draw are not differences.
func Compare(dir string, want *Content) (*Comparison, error) {
	rep := &Comparison{Items: want.Manifest.SampleSize, Spares: want.Manifest.Spares}
	if _, err := want.Render(); err != nil {
		return nil, err
	}
	got, _, err := ReadManifest(filepath.Join(dir, ManifestFile))
	if err != nil {
		return nil, err
	}
	diff := func(format string, args ...any) {
		rep.Differences = append(rep.Differences, fmt.Sprintf(format, args...))
	}
	w := want.Manifest
	field := func(name string, g, x any) {
		if fmt.Sprint(g) != fmt.Sprint(x) {
			diff("manifest %s: the folder has %v, the log and plan give %v", name, g, x)
		}
	}
	switch same, why := SameLog(got.Log, w.Log); {
	case !same:
		// Every other difference would only follow from this one.
		rep.Differences = []string{why}
		return rep, nil
	case why != "":
		rep.Notes = append(rep.Notes, why)
	}
	field("plan_fingerprint", got.PlanFingerprint, w.PlanFingerprint)
	field("selection_seed", got.SelectionSeed, w.SelectionSeed)
	field("log.rows", got.Log.Rows, w.Log.Rows)
	field("lot_size", got.LotSize, w.LotSize)
	field("sample_size", got.SampleSize, w.SampleSize)
	field("spares", got.Spares, w.Spares)
	field("duplicates_dropped", got.DuplicatesDropped, w.DuplicatesDropped)
	if a, b := completenessText(got.Completeness), completenessText(w.Completeness); a != b {
		diff("manifest completeness: the folder has %s, the log gives %s", a, b)
	}
	if fmt.Sprint(got.Strata) != fmt.Sprint(w.Strata) {
		diff("manifest strata: the folder has %s, the log and plan give %s", strataText(got.Strata), strataText(w.Strata))
	}
	// Files edited since the draw: the ledger must be unchanged; the
	// worksheets are expected to gain labels.
	if data, err := inputfile.ReadFile(filepath.Join(dir, LedgerFile), "ledger", inputfile.TableLimit); err == nil && got.Files[LedgerFile] != SHA256Hex(data) {
		diff("%s was changed after the draw: its SHA-256 is not the one in %s", LedgerFile, ManifestFile)
	}
	ledger, err := ReadLedger(filepath.Join(dir, LedgerFile), want.Candidates)
	if err != nil {
		return nil, err
	}
	rep.Differences = append(rep.Differences, compareLedger(ledger, want.Ledger)...)
	id := ManifestDrawID(want.Manifest)
	rep.Differences = append(rep.Differences, compareWorksheet(filepath.Join(dir, WorksheetFile), id, want.Show, want.Worksheet)...)
	secondPath := filepath.Join(dir, WorksheetSecondFile)
	if want.Second != nil {
		rep.Differences = append(rep.Differences, compareWorksheet(secondPath, id, want.Show, want.Second)...)
	} else if _, err := os.Stat(secondPath); err == nil {
		diff("%s is in the folder but the draw doubles no item", WorksheetSecondFile)
	}
	return rep, nil
}

// completenessText states a completeness for a comparison: its column,
// rows, first and last time, days checked and empty days.
func completenessText(c *chrono.Completeness) string {
	if c == nil {
		return "no time column"
	}
	return fmt.Sprintf("time column %s, %d rows from %s to %s, days %s to %s (%s), %d without rows %v, %d rows before and %d after",
		c.TimeColumn, c.Rows, chrono.Format(c.First), chrono.Format(c.Last), c.From, c.To, c.RangeOf, c.EmptyDayCount, c.EmptyDays, c.RowsBefore, c.RowsAfter)
}

// SameLog reports whether read, a log just read, is the log a draw
// recorded: the same content (decompressed bytes), whatever its
// compression. When it is not, why says so with both fingerprints; when it
// is the same content compressed differently, why notes that. A manifest
// from before content fingerprints is matched on the file's own SHA-256.
func SameLog(recorded, read LogInfo) (same bool, why string) {
	rec, got, what := recorded.ContentSHA256, read.ContentSHA256, "its content's SHA-256"
	if rec == "" {
		rec, got, what = recorded.SHA256, read.SHA256, "its SHA-256"
	}
	if rec != got {
		return false, fmt.Sprintf("this is not the log the draw was made from: %s is %s… (%s, %d rows), the draw's log %s had %s… (%s, %d rows)",
			what, short(got), read.Kind(), read.Rows, recorded.Path, short(rec), recorded.Kind(), recorded.Rows)
	}
	if recorded.SHA256 != read.SHA256 {
		return true, fmt.Sprintf("the log was compressed again since the draw: the same content (SHA-256 %s…) in a file with SHA-256 %s…, where the draw's log had %s…",
			short(rec), short(read.SHA256), short(recorded.SHA256))
	}
	return true, ""
}

// Kind is a log's format and compression, for messages: "csv",
// "jsonl, gzip".
func (l LogInfo) Kind() string {
	if l.Compression == "" || l.Compression == "none" {
		return l.Format
	}
	return l.Format + ", " + l.Compression
}

func strataText(s []StratumInfo) string {
	parts := make([]string, len(s))
	for i, x := range s {
		parts[i] = fmt.Sprintf("%s N=%d n=%d spare=%d", x.Label, x.Population, x.Sample, x.Spare)
	}
	return "[" + strings.Join(parts, "; ") + "]"
}

func compareLedger(got, want []LedgerRow) []string {
	var out []string
	listed := 0
	add := func(format string, args ...any) {
		listed++
		if listed <= maxListed {
			out = append(out, fmt.Sprintf(format, args...))
		}
	}
	wantByID := map[string]*LedgerRow{}
	for i := range want {
		wantByID[want[i].RecordID] = &want[i]
	}
	gotByID := map[string]*LedgerRow{}
	for i := range got {
		gotByID[got[i].RecordID] = &got[i]
	}
	for i := range got {
		g := &got[i]
		x, ok := wantByID[g.RecordID]
		if !ok {
			add("%s item %d: record_id %q was not picked by chance (it is not in the recomputed sample)", LedgerFile, g.Item, g.RecordID)
			continue
		}
		if d := ledgerRowDiff(g, x); d != "" {
			add("%s item %d (record_id %q): %s", LedgerFile, g.Item, g.RecordID, d)
		}
	}
	for i := range want {
		if _, ok := gotByID[want[i].RecordID]; !ok {
			kind := "sample"
			if want[i].Spare {
				kind = "spare"
			}
			add("%s: record_id %q (%s item %d of the recomputed draw, stratum %s) is missing", LedgerFile, want[i].RecordID, kind, want[i].Item, want[i].Stratum)
		}
	}
	if listed > maxListed {
		out = append(out, fmt.Sprintf("%s: %d more differences not listed", LedgerFile, listed-maxListed))
	}
	return out
}

func ledgerRowDiff(g, x *LedgerRow) string {
	var d []string
	cmp := func(name string, a, b any) {
		if fmt.Sprint(a) != fmt.Sprint(b) {
			d = append(d, fmt.Sprintf("%s is %v, recomputed %v", name, a, b))
		}
	}
	cmp("item", g.Item, x.Item)
	cmp("stratum", g.Stratum, x.Stratum)
	cmp("stratum_size", g.StratumSize, x.StratumSize)
	cmp("stratum_sample", g.StratumSample, x.StratumSample)
	cmp("weight", formatFloat(g.Weight), formatFloat(x.Weight))
	cmp("key", g.Key, x.Key)
	cmp("spare", g.Spare, x.Spare)
	cmp("double", g.Double, x.Double)
	cmp("predictions", g.Predictions, x.Predictions)
	return strings.Join(d, "; ")
}

// compareWorksheet checks the drawn columns of a worksheet (item,
// record_id, shown columns); labels, notes and labelers are ignored.
func compareWorksheet(path string, id DrawID, show []string, want []WorksheetRow) []string {
	name := filepath.Base(path)
	header, rows, err := ReadWorksheet(path)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return []string{fmt.Sprintf("%s is missing from the folder", name)}
		}
		return []string{err.Error()}
	}
	wantHeader := worksheetHeader(id, show)
	if strings.Join(header[:min(len(header), len(show)+2)], ",") != strings.Join(wantHeader[:len(show)+2], ",") {
		return []string{fmt.Sprintf("%s: columns are %s, the draw wrote %s", name, columnList(header), columnList(wantHeader))}
	}
	var out []string
	listed := 0
	if len(rows) != len(want) {
		out = append(out, fmt.Sprintf("%s has %d rows, the recomputed draw %d", name, len(rows), len(want)))
	}
	for i := 0; i < min(len(rows), len(want)); i++ {
		g, x := rows[i], want[i]
		if g.Item != x.Item || g.RecordID != x.RecordID || strings.Join(g.Show, "\x00") != strings.Join(x.Show, "\x00") {
			listed++
			if listed <= maxListed {
				out = append(out, fmt.Sprintf("%s line %d: item %d record_id %q, the recomputed draw has item %d record_id %q", name, g.Line, g.Item, g.RecordID, x.Item, x.RecordID))
			}
		}
	}
	if listed > maxListed {
		out = append(out, fmt.Sprintf("%s: %d more differences not listed", name, listed-maxListed))
	}
	return out
}
