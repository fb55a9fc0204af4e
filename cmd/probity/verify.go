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
	pub      string
	planPath string
	drawDir  string
	labels   string
	logPath  string
	// second and adjudicated are the labeled second worksheet and the
	// adjudication file of a record judged on double labels.
	second      string
	adjudicated string
	// templatesDir is the wording record.pdf was rendered with.
	templatesDir string
}

// newVerifyCommand builds `probity verify`.
func newVerifyCommand(d deps) *cobra.Command {
	opts := &verifyOptions{}
	cmd := &cobra.Command{
		Use:   "verify RECDIR [--pub KEY.pub] [--plan PLAN.yaml] [--draw DIR] [--labels WORKSHEET.csv] [--log FILE]",
		Short: "Check a record's signatures and recompute it from its inputs",
		Long: `verify checks an acceptance record folder and prints each check with its
outcome:

  - record.json is well formed and in canonical form (not edited by hand);
  - record.sig's signatures over record.json and record.pdf are valid, and
    the signing key is the one record.json names; with --pub, that it is
    your trusted key (without --pub the key is only reported);
  - record.pdf is byte for byte the rendering of record.json (A4 or Letter,
    the built-in wording or --templates), when this probity version made it;
  - with --plan, --draw, --labels: each input's SHA-256 is the one the
    record holds; given all three, the judgement is recomputed and compared
    with record.json field by field (a record judged on double labels also
    needs --second and, if it had one, --adjudicated);
  - with --log (and --plan, --draw): the sample is drawn again from the log
    and compared with the draw folder, so the items labeled are exactly the
    ones chance picked.

` + exitCodesHelp + `

verify exits 0 when every check it ran passed and 1 when any failed (the
failing checks say which file and what); 2 on bad usage or unreadable input.`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) != 1 {
				return inputerr.Errorf("verify needs exactly one record folder, got %d arguments", len(args)).WithHint("probity verify RECDIR [--pub KEY.pub]")
			}
			return nil
		},
		PreRunE: func(cmd *cobra.Command, args []string) error {
			if opts.adjudicated != "" && opts.second == "" {
				return inputerr.Errorf("--adjudicated needs --second").WithHint("pass the labeled worksheet-second.csv the record was made with")
			}
			if opts.logPath != "" && (opts.drawDir == "" || opts.planPath == "") {
				return inputerr.Errorf("--log needs --plan and --draw").WithHint("the sample is drawn again from the log with the plan's seed and the draw folder's settings")
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.dir = args[0]
			return runVerify(d, opts)
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&opts.pub, "pub", "", "trusted public key (NAME.pub from probity keygen)")
	fl.StringVar(&opts.planPath, "plan", "", "the plan file, to check and recompute from")
	fl.StringVar(&opts.drawDir, "draw", "", "the draw folder, to check and recompute from")
	fl.StringVar(&opts.labels, "labels", "", "the labeled worksheet, to check and recompute from")
	fl.StringVar(&opts.logPath, "log", "", "the prediction log, to draw the sample again")
	fl.StringVar(&opts.second, "second", "", "the labeled second worksheet of a record judged on double labels, to check and recompute from")
	fl.StringVar(&opts.adjudicated, "adjudicated", "", "the adjudication file of such a record, to check and recompute from")
	fl.StringVar(&opts.templatesDir, "templates", "", "the --templates folder the record was made with, to re-render record.pdf")
	return cmd
}

func runVerify(d deps, o *verifyOptions) error {
	in := verification.Input{
		Dir:          o.dir,
		Files:        assemble.Files{Plan: o.planPath, Draw: o.drawDir, Labels: o.labels, Second: o.second, Adjudications: o.adjudicated},
		Log:          o.logPath,
		TemplatesDir: o.templatesDir,
		ToolVersion:  d.version,
		Names: verification.Names{TrustedKey: "--pub", Templates: "--templates", Plan: "--plan", Draw: "--draw", Labels: "--labels",
			Log: "--log", Second: "--second", Adjudications: "--adjudicated"},
	}
	if o.pub != "" {
		k, err := loadPublicKey(o.pub)
		if err != nil {
			return err
		}
		in.TrustedKey, in.TrustedKeyPath = k, o.pub
	}
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
	fmt.Fprintf(d.stdout, "verified: %d checks passed\n", len(rep.Checks))
	return nil
}

// verifyStatus is how each outcome is printed.
func verifyStatus(s verification.Status) string {
	switch s {
	case verification.OK:
		return "ok"
	case verification.Failed:
		return "FAIL"
	}
	return "skip"
}
