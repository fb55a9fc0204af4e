package verification

import (
	"errors"
	"os"
	"path/filepath"
	"strings"

	"probity/plan/inputerr"
	"probity/plan/planfile"
	"probity/sampling"
	"probity/sampling/drawfolder"
)

// redraw draws the sample again from the log, with the plan's seed and the
// options the manifest records, and compares it with the draw folder.
func redraw(rep *Report, in Input) error {
	p, planFP, err := planfile.Load(in.Files.Plan)
	if err != nil {
		return err
	}
	mpath := filepath.Join(in.Files.Draw, drawfolder.ManifestFile)
	m, _, err := drawfolder.ReadManifest(mpath)
	if err != nil {
		return err
	}
	di, err := sampling.DrawInputFromManifest(m)
	if err != nil {
		return inputerr.InFile(err, mpath)
	}
	f, err := os.Open(in.Log)
	if err != nil {
		return inputerr.Errorf("cannot read %s %s: %v", in.Names.log(), in.Log, errors.Unwrap(err)).WithHint("pass the log the sample was drawn from").Wrap(err)
	}
	defer f.Close()
	di.Plan, di.PlanFingerprint, di.LogPath, di.Log, di.ToolVersion, di.MaxLine = p, planFP, in.Log, f, m.ToolVersion, in.MaxLine
	want, err := sampling.Redraw(m, di)
	if errors.Is(err, sampling.ErrNotTheLog) {
		rep.add(CheckSample, Failed, "%s: %s", in.Log, messageOf(err))
		return nil
	}
	if err != nil {
		if inputerr.Is(err) {
			rep.add(CheckSample, Failed, "drawing the sample again from %s: %v", in.Log, inputerr.InFile(err, mpath))
			return nil
		}
		return err
	}
	cmp, err := drawfolder.Compare(in.Files.Draw, want)
	if err != nil {
		return err
	}
	if len(cmp.Differences) == 0 {
		notes := ""
		if len(cmp.Notes) > 0 {
			notes = " (" + strings.Join(cmp.Notes, "; ") + ")"
		}
		rep.add(CheckSample, OK, "sample drawn again from %s: the draw folder holds exactly the %d items and %d spares chance picked%s", in.Log, cmp.Items, cmp.Spares, notes)
		return nil
	}
	rep.add(CheckSample, Failed, "the draw folder is not what chance picked from %s: %s", in.Log, strings.Join(cmp.Differences, "; "))
	return nil
}
