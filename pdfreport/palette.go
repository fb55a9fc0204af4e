package pdfreport

// Colour is an RGB colour, each channel 0–255.
type Colour struct{ R, G, B int }

// The palette of probity's documents, shared by the acceptance record and
// the trend page so that a verdict looks the same on both.
var (
	Ink         = Colour{25, 25, 30}    // body text
	Muted       = Colour{95, 100, 110}  // captions, footers
	Heading     = Colour{20, 45, 90}    // headings
	Rule        = Colour{170, 178, 190} // table and page rules
	HeadFill    = Colour{224, 230, 239} // table header fill
	ZebraFill   = Colour{245, 247, 250} // alternate row fill
	AcceptGreen = Colour{0, 122, 61}    // ACCEPT
	RejectRed   = Colour{190, 25, 35}   // REJECT
)
