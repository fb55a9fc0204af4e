package main

import (
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"time"

	"probity/sampling/demolog"
	"probity/sampling/drawfolder"
	"probity/sampling/labelserver"
	"probity/sampling/labeltrail"
)

// demoLabelPace is the time the demo's simulated labelers take per label
// event: November's labeling ends before its record is signed.
const demoLabelPace = 3 * time.Second

// demoLabelAddress is the address the demo's simulated labelers use: it
// never reaches a network (labelserver.InProcess).
const demoLabelAddress = "http://labeling.invalid"

// demoLabelThroughPage labels a draw of the demo on the labeling page, as
// its labelers would: the server of probity label (openLabeling), reached
// in process, with a clock that starts at start and advances demoLabelPace
// per reading. The first labeler (demolog.Labeler) goes through the
// worksheet's sequence giving the labels of first (items marked unsure
// and the spares the page then offers included); with second, the second
// labeler (demolog.SecondLabeler) labels the doubled items on the second
// worksheet's own address. drawDir is taken from the demo's folder base.
// The trail appears in the draw folder; the labeled worksheets derived from
// it are returned.
func demoLabelThroughPage(base, drawDir string, first, second []drawfolder.WorksheetRow, start time.Time) (firstOut, secondOut []byte, err error) {
	tick := start
	now := func() time.Time {
		t := tick
		tick = tick.Add(demoLabelPace)
		return t
	}
	// The access tokens never leave this process: a fixed stream keeps
	// the demo free of randomness.
	l, err := openLabeling(labelSetup{planPath: filepath.Join(base, demoPlan), drawDir: filepath.Join(base, drawDir), now: now, random: rand.NewChaCha8([32]byte{'d', 'e', 'm', 'o'})})
	if err != nil {
		return nil, nil, err
	}
	defer l.Close()
	transport := labelserver.InProcess(l.server.Handler())
	for _, sh := range l.server.Sheets() {
		rows, name := first, demolog.Labeler
		if sh.Name == drawfolder.WorksheetSecondFile {
			rows, name = second, demolog.SecondLabeler
		}
		if rows == nil {
			continue
		}
		c, err := labelserver.Open(transport, demoLabelAddress+sh.Path)
		if err != nil {
			return nil, nil, err
		}
		if err := c.Name(name); err != nil {
			return nil, nil, err
		}
		if err := demoLabelSheet(c, rows); err != nil {
			return nil, nil, fmt.Errorf("demo labeling of %s: %w", sh.Name, err)
		}
	}
	st := l.trail.State()
	if firstOut, err = st.Derive(drawfolder.WorksheetFile); err != nil {
		return nil, nil, err
	}
	if second != nil {
		secondOut, err = st.Derive(drawfolder.WorksheetSecondFile)
	}
	return firstOut, secondOut, err
}

// demoLabelSheet goes through the page's sequence of items from the top,
// giving each blank item the label and note rows hold for it; the
// sequence grows by the spare the page offers for each item marked unsure.
func demoLabelSheet(c *labelserver.Client, rows []drawfolder.WorksheetRow) error {
	want := map[int]drawfolder.WorksheetRow{}
	for _, r := range rows {
		want[r.Item] = r
	}
	st, err := c.State()
	if err != nil {
		return err
	}
	// The demo's trail is begun with its draw: every item starts blank.
	seq := st.Sequence
	for i := 0; i < len(seq); i++ {
		r := want[seq[i].Item]
		if r.Label == "" || seq[i].Labeled {
			continue
		}
		v, err := c.Label(labelserver.LabelRequest{Item: r.Item, Label: r.Label, Note: r.Note})
		if err != nil {
			return err
		}
		if v.Sequence != nil {
			seq = v.Sequence
		}
	}
	return nil
}

// demoTrail is the trail's path in a demo draw folder.
func demoTrail(drawDir string) string {
	return filepath.Join(drawDir, labeltrail.FileName)
}
