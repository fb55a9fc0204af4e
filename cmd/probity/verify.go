package main

import (
	"errors"
	"fmt"

	"github.com/spf13/cobra"

	"probity/plan/inputerr"
	"probity/plan/record/assemble"
	"probity/plan/record/verification"
	"probity/templates"
)

// verifyOptions are the flags of probity verify.
type verifyOptions struct {
	dir      string
	pub      []string
	signers  string
	planPath string
	drawDir  string
	labels   string
	logPath  string
	// second and adjudicated are the labeled second worksheet and the
	// adjudication file of a record judged on double labels.
	second      string
	adjudicated string
	// trail is the label trail a record's labels were derived from.
	trail string
	// templatesDir is the wording record.pdf was rendered with.
	templatesDir string
	// maxLine bounds a line of the log (--max-line), parsedMaxLine read.
	maxLine       string
	parsedMaxLine int64
}

// newVerifyCommand builds `probity verify`.
func newVerifyCommand(d deps) *cobra.Command {
	opts := &verifyOptions{}
	cmd := &cobra.Command{
		Use:   "verify RECDIR [--pub KEY] [--plan FILE] [--draw DIR] [--labels|--trail FILE]",
		Short: "Authenticate a record's signatures and recompute it from its inputs",
		Long: `verify checks an acceptance record folder and prints each check with its
outcome. It says "verified" (exit 0) only when the record is authenticated
and every check it ran passed:

  - record.json is a record of this format in canonical form (not edited by
    hand), and its record id is the digest of its content;
  - the operator's seal (record.sig) is valid over record.json and the PDF
    as issued, made with the key record.json names, and that key is
    trusted: one of the --pub keys, or an operator in the --signers file;
  - every person's signature (signatures.txt, from probity sign) is valid,
    bound to record.json, to the seal and to the signatures before it, made
    with the key the --signers file gives that person in that role, and
    dated neither before the record's date nor after this computer's clock;
  - the record carries at least one signature, and each one checked: a
    record nothing authenticates fails;
  - record.pdf is byte for byte the rendering of record.json and its
    signatures (A4 or Letter, the built-in wording or --templates), and each
    signer's signature and the seal cover the rendering they were shown.
    For a record made by another probity version, whose layout may differ,
    a PDF that is not the rendering passes only when it is exactly the PDF
    the last trusted signature signed; the limitation is printed ("limit");
  - with --plan, --draw, --labels: each input's SHA-256 is the one the
    record holds; given all three, the judgement is recomputed and compared
    with record.json field by field (a record judged on double labels also
    needs --second and, if it had one, --adjudicated); for a plan with
    measures every claim (counts, estimate, bound, verdict), the estimated
    confusion matrices and the released candidate are recomputed too;
  - with --trail (a record made from a label trail): the trail's SHA-256
    is the record's, its hash chain holds, it belongs to the draw, and the
    labeled worksheets derived from it again give the same judgement;
  - with --log (and --plan, --draw): the sample is drawn again from the log
    and compared with the draw folder, so the items labeled are exactly the
    ones chance picked.

The keys probity demo signs with are published with the source: a seal or
signature made with one is reported as a demonstration and never
authenticates, so verify exits 1 on a demo record whatever is trusted.

` + signersHelp + `

` + exitHelp("the record is authenticated and every check it ran passed",
			"anything could not be authenticated, or a check failed (the failing checks say\nwhich file and what)", false),
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) != 1 {
				return inputerr.Errorf("verify needs exactly one record folder, got %d arguments", len(args)).WithHint("probity verify RECDIR [--pub KEY.pub]")
			}
			return nil
		},
		PreRunE: func(cmd *cobra.Command, args []string) error {
			if opts.adjudicated != "" && opts.second == "" && opts.trail == "" {
				return inputerr.Errorf("--adjudicated needs --second or --trail").WithHint("pass the labeled worksheet-second.csv or the label trail the record was made with")
			}
			if opts.logPath != "" && (opts.drawDir == "" || opts.planPath == "") {
				return inputerr.Errorf("--log needs --plan and --draw").WithHint("the sample is drawn again from the log with the plan's seed and the draw folder's settings")
			}
			if opts.maxLine != "" {
				n, err := parseSize("--max-line", opts.maxLine)
				if err != nil {
					return err
				}
				opts.parsedMaxLine = n
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.dir = args[0]
			return runVerify(d, opts)
		},
	}
	fl := cmd.Flags()
	fl.StringArrayVar(&opts.pub, "pub", nil, "a public `KEY.pub` (from probity keygen) trusted to seal records; repeatable")
	fl.StringVar(&opts.signers, "signers", "", "the signers `FILE`: whose key signs in which role")
	fl.StringVar(&opts.planPath, "plan", "", "the plan `FILE`, to check and recompute from")
	fl.StringVar(&opts.drawDir, "draw", "", "the draw folder `DIR`, to check and recompute from")
	fl.StringVar(&opts.labels, "labels", "", "the labeled worksheet `FILE`, to check and recompute from")
	fl.StringVar(&opts.logPath, "log", "", "the prediction log `FILE`, to draw the sample again")
	fl.StringVar(&opts.maxLine, "max-line", "", "with --log: "+maxLineHelp)
	fl.StringVar(&opts.second, "second", "", "the labeled second worksheet `FILE` of a record judged on double labels, to check and recompute from")
	fl.StringVar(&opts.adjudicated, "adjudicated", "", "the adjudication `FILE` of such a record, to check and recompute from")
	fl.StringVar(&opts.trail, "trail", "", "the label `TRAIL` (label-trail.jsonl in the draw folder) the record's labels were derived from, to check and recompute from")
	fl.StringVar(&opts.templatesDir, "templates", "", "the --templates folder `DIR` the record was made with, to re-render record.pdf")
	return cmd
}

func runVerify(d deps, o *verifyOptions) error {
	in := verification.Input{
		Dir:          o.dir,
		Files:        assemble.Files{Plan: o.planPath, Draw: o.drawDir, Labels: o.labels, Second: o.second, Adjudications: o.adjudicated, Trail: o.trail},
		Log:          o.logPath,
		MaxLine:      o.parsedMaxLine,
		TemplatesDir: o.templatesDir,
		ToolVersion:  d.version,
		Names:        verifyNames,
	}
	trust, err := loadTrust(d, o.pub, o.signers)
	if err != nil {
		return err
	}
	in.Trust = trust
	set, err := templates.Load(o.templatesDir)
	if err != nil {
		return inputerr.SetHint(err, "pass the --templates folder the record was made with")
	}
	in.Templates = set
	rep, err := verification.Verify(in)
	if errors.Is(err, verification.ErrNoRecord) {
		return inputerr.SetHint(err, "pass the --out folder of probity record")
	}
	if err != nil {
		return err
	}
	for _, c := range rep.Checks {
		fmt.Fprintf(d.stdout, "%-6s%s\n", verifyStatus(c.Status), c.Detail)
	}
	if failed := rep.Failed(); len(failed) > 0 {
		return rejected("verification failed: %d of %d checks (%s)", len(failed), len(rep.Checks), failed[0].Detail)
	}
	passed := countOf(rep.Count(verification.OK), "check", "checks") + " passed"
	if n := rep.Count(verification.Limited); n > 0 {
		passed += fmt.Sprintf(", %d with a stated limitation", n)
	}
	fmt.Fprintf(d.stdout, "verified: %s\n", passed)
	return nil
}

// verifyNames are the flags verify and trend take each input from.
var verifyNames = verification.Names{TrustedKey: "--pub", Signers: "--signers", Templates: "--templates", Plan: "--plan", Draw: "--draw",
	Labels: "--labels", Log: "--log", Second: "--second", Adjudications: "--adjudicated", Trail: "--trail"}

// loadTrust reads the trusted keys and the signers file, with the clock.
func loadTrust(d deps, pubs []string, signers string) (verification.Trust, error) {
	t := verification.Trust{Now: d.now()}
	for _, p := range pubs {
		k, err := loadPublicKey(p)
		if err != nil {
			return t, err
		}
		t.Keys = append(t.Keys, verification.TrustedKey{Key: k, Path: p})
	}
	if signers != "" {
		s, err := loadSigners(signers)
		if err != nil {
			return t, err
		}
		t.Signers = s
	}
	return t, nil
}

// verifyStatus is how each outcome is printed.
func verifyStatus(s verification.Status) string {
	switch s {
	case verification.OK:
		return "ok"
	case verification.Failed:
		return "FAIL"
	case verification.Limited:
		return "limit"
	}
	return "skip"
}
