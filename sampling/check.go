package sampling

import (
	"errors"
	"fmt"

	"probity/plan/chrono"
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
			Spare: m.Allocation.Spare, Rounding: m.Allocation.Rounding},
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
	if c := m.Completeness; c != nil {
		in.TimeColumn = c.TimeColumn
		if c.RangeOf == chrono.RangeDeclared {
			var ok bool
			if in.Days, ok = chrono.ParseDayRange(c.From + "/" + c.To); !ok {
				return in, &inputerr.Error{Field: "completeness.from", Msg: fmt.Sprintf("%q to %q is not a range of days", c.From, c.To)}
			}
		}
	}
	if in.Alloc.Rule == Neyman {
		in.Alloc.Anticipated = map[string]float64{}
		for _, s := range m.Strata {
			in.Alloc.Anticipated[s.Label] = s.Anticipated
		}
	}
	return in, nil
}

// ErrNotTheLog is wrapped by the error of Redraw about a log that cannot
// be the one the draw was made from.
var ErrNotTheLog = errors.New("not the log the draw was made from")

// Redraw draws again, with the options m records (in, from
// DrawInputFromManifest, completed by the caller with the plan and the
// log), for a comparison with the draw folder (drawfolder.Compare, which
// also tells a log compressed again from another log). A log that cannot
// be the one the draw read — its name gives another format than the
// draw's log had, or it cannot be read as that log was — is an input
// error wrapping ErrNotTheLog that says so. (A line over the length limit
// is left as it is: raising the limit is its fix.)
func Redraw(m *drawfolder.Manifest, in DrawInput) (*drawfolder.Content, error) {
	name := in.LogPath
	if name == "-" {
		name = "stdin"
	}
	if f := FormatFromName(in.LogPath); f != "" && m.Log.Format != "" && f != m.Log.Format {
		return nil, notTheLog(name, fmt.Sprintf("its name says %s, but the draw read %s (%s)", f, m.Log.Path, m.Log.Kind()))
	}
	c, err := Draw(in)
	if err == nil {
		return c, nil
	}
	if ie, ok := inputerr.As(err); ok && ie.File == name && !errors.Is(err, ErrLineTooLong) {
		return nil, notTheLog(name, fmt.Sprintf("it cannot be read as the draw's log %s (%s) was: %s", m.Log.Path, m.Log.Kind(), err))
	}
	return nil, err
}

// notTheLog is the error about a log that is not the draw's.
func notTheLog(name, why string) *inputerr.Error {
	e := inputErrorf(name, 0, "", "this is not the log the draw was made from: %s", why)
	e.Err = ErrNotTheLog
	e.Hint = "give the log the draw was made from (compressed again is fine; the same rows in another format are another file)"
	return e
}
