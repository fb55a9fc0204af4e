// Package templates holds the fixed wording of the acceptance record: the
// cautions for each declared use and every fixed sentence the PDF prints
// (the method statement, the assumptions, the statement of conformity, the
// scope statement, the deviations wording and the meaning of each
// signature). The files are embedded with go:embed so the tool works on its
// own, and a reviewer can read and amend them without touching code: Load
// with a directory replaces the embedded files file by file.
//
// # File format
//
// Every file is UTF-8 text in a small Markdown-like form. Blank lines
// separate paragraphs; the lines of a paragraph are joined with spaces. A
// line starting with "- " starts a bullet item; following lines that are
// not blank and do not start a new item continue it. Nothing else is
// interpreted: no emphasis, links or headings (the PDF supplies the
// headings).
//
// The caution files (caution-USE.md) are plain text. The other files are Go
// text/template templates: {{.Field}} inserts a value of Fields (already
// formatted, e.g. "2.000 %"), {{if .Field}}…{{end}} prints text only when
// the field is set, and {{/* … */}} is a comment. A template that does not
// parse, or names a field Fields does not have, is refused when the set is
// loaded.
//
// # Files
//
// caution-general.md, caution-safety.md, caution-medical.md,
// caution-vehicle.md, caution-credit.md, caution-employment.md: the
// cautions printed for each use. method.md: the method statement.
// assumptions.md: the assumptions, as bullets. decision-rule.md: the
// statement of conformity with its false-accept risk. scope.md: the scope
// statement. deviations-none.md: printed when there were no deviations.
// deviations-incomplete.md: printed when incomplete labeling was allowed.
// signoff-intro.md and signoff-prepared.md, signoff-reviewed.md,
// signoff-approved.md: the sign-off block's preamble and the default
// meaning of each signature.
package templates
