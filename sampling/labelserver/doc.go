// Package labelserver serves the labeling page of a draw: a blind page on
// which labelers label one item at a time, every label event going into
// the draw's audit trail (package labeltrail) before the page confirms
// it.
//
// What the page shows. Only the worksheet's rows: item, record id and the
// columns the draw chose to show (a shown value that names an image file
// in the media folder is shown as the image). The server also holds the
// ledger, for one reason only — to offer, when an item is marked unsure,
// the spare the draw's rule assigns to it (the next unused spare of its
// stratum, in key order) — and never puts a prediction, score, stratum,
// weight or key into a page, a response or a URL. The only count shown is
// how many items are labeled.
//
// Worksheets and tokens. Each worksheet of the draw (worksheet.csv, and
// worksheet-second.csv of a draw with double labeling) has its own random
// access token, and every path is under /s/TOKEN/: a labeler holding the
// second worksheet's address sees the doubled items and their second
// labels only, never the first labels.
//
// Security. Every request needs a worksheet's token in its path (else
// 403); the Host header must be one of Config.Hosts when they are given
// (a page on another site cannot reach the server through a name it
// controls); a request that changes anything (naming the labeler, a
// label event) is a POST of JSON carrying the session's CSRF token, which
// the page receives in its HTML, and its Origin, when sent, must be the
// server's. Responses carry a Content-Security-Policy that allows nothing
// but the server's own scripts, styles, images and requests; the page's
// assets are embedded in the binary, so it works offline. Media files are
// read through an os.Root (nothing outside the folder, by ".." or by a
// symbolic link, can be opened), only when an item of the worksheet names
// them, and only if they are regular image files.
//
// Spares. Marking a sample item unsure makes the next spare of its
// stratum (key order) part of the worksheet's sequence, and the page
// offers it; a spare not so assigned cannot be labeled, and a change that
// would leave a labeled spare without an unsure item to replace (or a gap
// before it) is refused, so a worksheet labeled here always meets the
// record's rule for spares.
//
// The package never prints and reads no clock or global randomness: the
// clock and the random source are in Config.
package labelserver
