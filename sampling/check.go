package sampling

import (
	"probity/plan/inputerr"
	"probity/sampling/drawfolder"
)

// DrawInputFromManifest returns the draw options recorded in a manifest,
// so that a check can repeat the draw exactly. Plan, Log and LogPath are
// left for the caller. An option the manifest holds that cannot be used is
// an input error whose Field is the manifest's key and whose File is left
// for the caller, who knows where the manifest was read from.
func DrawInputFromManifest(m *drawfolder.Manifest) (DrawInput, error) {
	in := DrawInput{
		Format:        m.Log.Format,
		Period:        m.Period,
		IDColumn:      m.IDColumn,
		StrataColumns: append([]string{}, m.StrataColumns...),
		Show:          append([]string{}, m.ShowColumns...),
		Alloc: AllocOptions{Rule: m.Allocation.Rule, MinPerStratum: m.Allocation.MinPerStratum,
			Spare: m.Allocation.Spare},
		NeymanSource: m.Allocation.NeymanSource,
		Double:       m.Double,
		Dedupe:       m.Dedupe == "first",
	}
	for _, s := range m.Bands {
		b, err := ParseBand(s)
		if err != nil {
			return in, &inputerr.Error{Field: "bands", Msg: err.Error(), Err: err}
		}
		in.Bands = append(in.Bands, b)
	}
	for _, s := range m.Where {
		f, err := ParseFilter(s)
		if err != nil {
			return in, &inputerr.Error{Field: "where", Msg: err.Error(), Err: err}
		}
		in.Where = append(in.Where, f)
	}
	if in.Alloc.Rule == Neyman {
		in.Alloc.Anticipated = map[string]float64{}
		for _, s := range m.Strata {
			in.Alloc.Anticipated[s.Label] = s.Anticipated
		}
	}
	return in, nil
}
