// Package pdfreport lays out the PDF acceptance record from a
// record.Record. It computes nothing new: every number it prints is a field
// of the Record (the judgement, the plan, the OC curve points, the
// fingerprints), formatted as described in format.go; every fixed sentence
// comes from package templates.
//
// The layout is deterministic: the same Record and Options give the same
// bytes. The document dates come from Record.Date, the producer string is
// fixed, resource catalogs are sorted, and the fonts (Liberation Sans and
// Liberation Mono, embedded as subsets so UTF-8 names render) are the ones
// compiled into the binary.
//
// Each section of the record is a method of doc in its own file (summary.go,
// planinfo.go, occurve.go, …); Render calls them in order. A new section is
// a new file with a method and one line in Render's section list.
package pdfreport
