package drawfolder

import (
	"fmt"
	"strings"
)

// DrawID names the draw a worksheet belongs to, in the worksheet's first
// header cell: "item (draw: period 2026-11, seed 7d1f0c9a2b3e)". A
// labeled worksheet brought to another draw's folder then says whose it
// is. Seed is the start of the selection seed (the period's seed for a
// draw for a period).
type DrawID struct {
	Period string
	Seed   string
}

// idSeedLen is how much of the selection seed a worksheet shows.
const idSeedLen = 12

// ManifestDrawID is the DrawID of the draw a manifest describes.
func ManifestDrawID(m *Manifest) DrawID {
	return DrawID{Period: m.Period, Seed: startOfSeed(m.SelectionSeed)}
}

func startOfSeed(s string) string {
	r := []rune(s)
	if len(r) > idSeedLen {
		return string(r[:idSeedLen])
	}
	return s
}

// String is "period 2026-11, seed 7d1f0c9a2b3e" ("seed …" without a
// period).
func (d DrawID) String() string {
	if d.Period != "" {
		return fmt.Sprintf("period %s, seed %s", d.Period, d.Seed)
	}
	return "seed " + d.Seed
}

// Same reports whether two ids name the same draw.
func (d DrawID) Same(o DrawID) bool { return d.Period == o.Period && d.Seed == o.Seed }

// itemCell is the first header cell of a worksheet of this draw ("item"
// when the draw is not known, as for worksheets written by hand).
func (d DrawID) itemCell() string {
	if d.Seed == "" {
		return "item"
	}
	return "item (draw: " + d.String() + ")"
}

// parseItemCell reads a worksheet's first header cell: "item", or
// "item (draw: …)" naming its draw (known true).
func parseItemCell(cell string) (id DrawID, known, ok bool) {
	if cell == "item" {
		return DrawID{}, false, true
	}
	inner, ok := strings.CutPrefix(cell, "item (draw: ")
	if !ok {
		return DrawID{}, false, false
	}
	if inner, ok = strings.CutSuffix(inner, ")"); !ok {
		return DrawID{}, false, false
	}
	if p, rest, found := strings.Cut(inner, ", seed "); found {
		if period, ok := strings.CutPrefix(p, "period "); ok {
			return DrawID{Period: period, Seed: rest}, true, true
		}
	}
	if seed, ok := strings.CutPrefix(inner, "seed "); ok {
		return DrawID{Seed: seed}, true, true
	}
	return DrawID{}, false, false
}
