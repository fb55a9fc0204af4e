package drawfolder

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"

	"probity/plan/inputerr"
	"probity/plan/inputfile"
)

// Folder is a draw folder opened by Open: its files as read, with their
// bytes for fingerprinting, checked to belong together and to the plan.
type Folder struct {
	Dir           string
	Manifest      *Manifest
	ManifestBytes []byte
	// Ledger is ledger.csv, in its order (the worksheet's).
	Ledger      []LedgerRow
	LedgerBytes []byte
	// WorksheetHeader and Worksheet are the draw's worksheet.csv.
	WorksheetHeader []string
	Worksheet       []WorksheetRow
	WorksheetBytes  []byte
	// LabeledInPlace is set when worksheet.csv in the folder carries
	// labels: its bytes then differ from the manifest's, but with the
	// label, note and labeler columns emptied they are exactly what the
	// draw wrote. WorksheetSHA256 is then the manifest's value.
	LabeledInPlace  bool
	WorksheetSHA256 string
	// StratumIndex maps each stratum's label to its position in
	// Manifest.Strata.
	StratumIndex map[string]int
}

// Path is the path of the folder's file name.
func (f *Folder) Path(name string) string { return filepath.Join(f.Dir, name) }

// Open reads the draw folder dir and checks that it is one draw, made from
// the plan whose fingerprint (the SHA-256 of the plan file) is planFP:
//
//   - manifest.json is well formed and its plan_fingerprint is planFP;
//   - its strata are listed once each, with 0 ≤ n_h ≤ N_h and N_h ≥ 1;
//   - ledger.csv's SHA-256 is the one the manifest records, its prediction
//     columns are candidates (the plan's candidate names, in order), and
//     its rows agree with the manifest's strata: every row's stratum is
//     listed with the same N_h and n_h, and each stratum holds n_h sample
//     rows;
//   - worksheet.csv's SHA-256 is the manifest's, or the file is the draw's
//     worksheet labeled in place (Folder.LabeledInPlace).
//
// Every reader of a draw folder for judging (record, progress, verify and
// the demo) opens it here. Errors are *inputerr.Error values naming the
// file, and the line and field where there is one.
func Open(dir, planFP string, candidates []string) (*Folder, error) {
	return open(dir, planFP, candidates, inputfile.ReadFile)
}

// OpenContent is Open on a draw that was made but not written: its files
// are rendered in memory (Content.Render) and read back through the same
// checks, so a judgement of them is the judgement of the folder the draw
// would write (Dir is empty). Simulations of the whole audit use it.
func OpenContent(c *Content, planFP string, candidates []string) (*Folder, error) {
	files, err := c.Render()
	if err != nil {
		return nil, err
	}
	byName := map[string][]byte{}
	for _, f := range files {
		byName[f.Name] = f.Data
	}
	return open("", planFP, candidates, func(name, _ string, _ int64) ([]byte, error) {
		data, ok := byName[filepath.Base(name)]
		if !ok {
			return nil, inputerr.FromPath(&os.PathError{Op: "open", Path: name, Err: os.ErrNotExist})
		}
		return data, nil
	})
}

// open is Open reading the folder's files with read (inputfile.ReadFile's
// signature: the file's path, what it is, and its size bound).
func open(dir, planFP string, candidates []string, read func(path, what string, limit int64) ([]byte, error)) (*Folder, error) {
	f := &Folder{Dir: dir}
	var err error
	mpath := f.Path(ManifestFile)
	if f.ManifestBytes, err = read(mpath, "manifest", inputfile.SmallLimit); err != nil {
		return nil, err
	}
	if f.Manifest, err = ParseManifest(f.ManifestBytes, mpath); err != nil {
		return nil, err
	}
	if err := f.CheckPlan(planFP); err != nil {
		return nil, err
	}
	if f.StratumIndex, err = strataIndex(f.Manifest, mpath); err != nil {
		return nil, err
	}
	lpath := f.Path(LedgerFile)
	if f.LedgerBytes, err = read(lpath, "ledger", inputfile.TableLimit); err != nil {
		return nil, err
	}
	if err := f.matchManifest(lpath, LedgerFile, f.LedgerBytes); err != nil {
		return nil, err
	}
	t, err := ParseCSVTable(f.LedgerBytes, lpath)
	if err != nil {
		return nil, err
	}
	if f.Ledger, err = ledgerFromTable(lpath, t, candidates); err != nil {
		return nil, err
	}
	if err := f.checkLedgerStrata(lpath); err != nil {
		return nil, err
	}
	wpath := f.Path(WorksheetFile)
	if f.WorksheetBytes, err = read(wpath, "worksheet", inputfile.TableLimit); err != nil {
		return nil, err
	}
	if t, err = ParseCSVTable(f.WorksheetBytes, wpath); err != nil {
		return nil, err
	}
	if f.WorksheetHeader, f.Worksheet, err = worksheetFromTable(wpath, t); err != nil {
		return nil, err
	}
	f.WorksheetSHA256 = SHA256Hex(f.WorksheetBytes)
	if err := f.matchManifest(wpath, WorksheetFile, f.WorksheetBytes); err != nil {
		blank, berr := blankWorksheet(f.WorksheetHeader, f.Worksheet)
		if berr != nil || SHA256Hex(blank) != f.Manifest.Files[WorksheetFile] {
			return nil, err
		}
		f.LabeledInPlace = true
		f.WorksheetSHA256 = f.Manifest.Files[WorksheetFile]
	}
	return f, nil
}

// CheckPlan checks that the folder was drawn from the plan whose
// fingerprint is planFP (the manifest's plan_fingerprint).
func (f *Folder) CheckPlan(planFP string) error {
	m := f.Manifest
	if m.PlanFingerprint != planFP {
		return &inputerr.Error{File: f.Path(ManifestFile), Field: "plan_fingerprint",
			Msg:  fmt.Sprintf("the draw was made from the plan with SHA-256 %s…, not from this plan (%s…)", short(m.PlanFingerprint), short(planFP)),
			Hint: "pass the plan file the draw was made with"}
	}
	return nil
}

// short is the first 12 digits of a fingerprint, for messages.
func short(h string) string {
	if len(h) > 12 {
		return h[:12]
	}
	return h
}

// matchManifest checks a file's SHA-256 against manifest.files[name].
func (f *Folder) matchManifest(path, name string, data []byte) error {
	want, ok := f.Manifest.Files[name]
	if !ok {
		return &inputerr.Error{File: f.Path(ManifestFile), Field: "files." + name, Msg: fmt.Sprintf("the manifest records no SHA-256 for %s", name),
			Hint: "use the manifest.json written by probity draw"}
	}
	if got := SHA256Hex(data); got != want {
		return &inputerr.Error{File: path,
			Msg:  fmt.Sprintf("SHA-256 %s… differs from the %s… that %s records: the file was changed after the draw", short(got), short(want), f.Path(ManifestFile)),
			Hint: fmt.Sprintf("restore the %s written by probity draw (label a copy of the worksheet and give that copy as the labels)", name)}
	}
	return nil
}

// strataIndex checks the manifest's strata and maps each label to its
// position.
func strataIndex(m *Manifest, mpath string) (map[string]int, error) {
	index := map[string]int{}
	for i, s := range m.Strata {
		if _, dup := index[s.Label]; dup {
			return nil, &inputerr.Error{File: mpath, Field: fmt.Sprintf("strata[%d].label", i), Msg: fmt.Sprintf("stratum %q is listed twice", s.Label)}
		}
		if s.Population < 1 || s.Sample < 0 || int64(s.Sample) > s.Population {
			return nil, &inputerr.Error{File: mpath, Field: fmt.Sprintf("strata[%d]", i), Msg: fmt.Sprintf("stratum %q has population %d and sample %d", s.Label, s.Population, s.Sample)}
		}
		index[s.Label] = i
	}
	if len(index) == 0 {
		return nil, &inputerr.Error{File: mpath, Field: "strata", Msg: "the manifest lists no strata"}
	}
	return index, nil
}

// checkLedgerStrata checks the ledger against the manifest's strata: every
// row's stratum is listed with the same N_h and n_h, and each stratum
// holds n_h sample rows.
func (f *Folder) checkLedgerStrata(lpath string) error {
	m := f.Manifest
	counts := make([]int, len(m.Strata))
	for _, r := range f.Ledger {
		h, ok := f.StratumIndex[r.Stratum]
		if !ok {
			return &inputerr.Error{File: lpath, Field: "stratum", Msg: fmt.Sprintf("item %d: stratum %q is not in the manifest", r.Item, r.Stratum)}
		}
		s := m.Strata[h]
		if r.StratumSize != s.Population || r.StratumSample != s.Sample {
			return &inputerr.Error{File: lpath, Field: "stratum_size", Msg: fmt.Sprintf("item %d: stratum %q has N_h = %d, n_h = %d where the manifest has %d, %d", r.Item, r.Stratum, r.StratumSize, r.StratumSample, s.Population, s.Sample)}
		}
		if !r.Spare {
			counts[h]++
		}
	}
	for h, s := range m.Strata {
		if counts[h] != s.Sample {
			return &inputerr.Error{File: lpath, Msg: fmt.Sprintf("stratum %q has %d sample rows where the manifest has n_h = %d", s.Label, counts[h], s.Sample)}
		}
	}
	return nil
}

// blankWorksheet re-writes a worksheet with its label, note and labeler
// columns emptied, the way the draw wrote it.
func blankWorksheet(header []string, rows []WorksheetRow) ([]byte, error) {
	blank := make([]WorksheetRow, len(rows))
	for i, r := range rows {
		blank[i] = WorksheetRow{Item: r.Item, RecordID: r.RecordID, Spare: r.Spare, Show: r.Show}
	}
	nShow := len(ShownColumns(header))
	first := 2
	if HasSpareColumn(header) {
		first = 3
	}
	h := append(append([]string{}, header[:first+nShow]...), "label", "note", "labeler")
	var buf bytes.Buffer
	if err := writeWorksheet(&buf, h, nShow, blank); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}
