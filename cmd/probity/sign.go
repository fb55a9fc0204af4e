package main

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"probity/plan/inputerr"
	"probity/plan/record"
	"probity/plan/record/signature"
	"probity/plan/record/signing"
	"probity/sampling/safewrite"
	"probity/templates"
)

// signOptions are the flags of probity sign.
type signOptions struct {
	dir          string
	key          string
	role         string
	name         string
	signers      string
	templatesDir string
	passphrase   passphraseSource
}

// newSignCommand builds `probity sign`.
func newSignCommand(d deps) *cobra.Command {
	opts := &signOptions{}
	cmd := &cobra.Command{
		Use:   "sign RECDIR --role ROLE --key KEY [--name NAME] [--signers FILE]",
		Short: "Sign a record electronically, as its preparer, reviewer or approver",
		Long: `sign adds a person's electronic signature to the record in RECDIR. The
signature manifestation holds the signer's printed name, the sign-off role
(prepared, reviewed or approved), the meaning of the signature (the one the
record's sign-off states for the role) and the date and time of signing in
UTC, from this computer's clock. It is signed with the signer's own Ed25519
key (probity keygen) and bound to record.json, to the operator's seal and
to the signatures before it, in signatures.txt. record.pdf is rendered
again with the signature shown in its sign-off block; the digest of that
PDF is part of what is signed, so the signature covers the form a reader
sees.

Before signing it checks the record: record.json unedited (its id
recomputes), the seal and the earlier signatures valid and chained, and
record.pdf exactly the rendering of record.json and those signatures (with
--templates if the record was made with custom wording), so that a signer
signs only what is shown faithfully. A role is signed once. The name is
the one the sign-off file gave for the role unless --name gives another;
with --signers the key must be that person's, in that role. A published
demo key signs nothing but demo records.

Each signed message is plain text, documented in the README, so anyone can
check a signature with another Ed25519 implementation (openssl pkeyutl).

` + signersHelp + `

` + passphraseHelp + `

` + exitHelp("the signature was added", "", true),
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) != 1 {
				return inputerr.Errorf("sign needs exactly one record folder, got %d arguments", len(args)).WithHint("probity sign RECDIR --role reviewed --key KEY")
			}
			return nil
		},
		PreRunE: func(cmd *cobra.Command, args []string) error {
			return opts.validate()
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.dir = args[0]
			return runSign(d, opts)
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&opts.role, "role", "", "the sign-off `ROLE` signed: prepared, reviewed or approved")
	fl.StringVar(&opts.key, "key", "", "the signer's private `KEY` (from probity keygen)")
	fl.StringVar(&opts.name, "name", "", "the signer's printed `NAME` (default: the one the sign-off file gave for the role)")
	fl.StringVar(&opts.signers, "signers", "", "the signers `FILE`: refuse a key that is not this signer's in this role")
	fl.StringVar(&opts.templatesDir, "templates", "", "the --templates `DIR` the record was made with")
	addPassphraseFlag(cmd, &opts.passphrase)
	return cmd
}

// validate checks the flags that need no file.
func (o *signOptions) validate() error {
	if o.key == "" {
		return inputerr.Errorf("--key is required").WithHint("pass your private key from 'probity keygen --protect --out NAME'")
	}
	if o.role == "" {
		return inputerr.Errorf("--role is required").WithHint("one of " + strings.Join(record.SignoffRoles, ", "))
	}
	for _, r := range record.SignoffRoles {
		if o.role == r {
			return nil
		}
	}
	return inputerr.Errorf("--role %q is not one of %s", o.role, strings.Join(record.SignoffRoles, ", ")).
		WithHint("the roles are the sign-off file's: prepared, reviewed, approved")
}

func runSign(d deps, o *signOptions) error {
	if st, err := os.Stat(o.dir); err != nil || !st.IsDir() {
		return inputerr.Errorf("%s is not a record folder", o.dir).WithHint("pass the --out folder of probity record")
	}
	var signers *signature.Signers
	if o.signers != "" {
		var err error
		if signers, err = loadSigners(o.signers); err != nil {
			return err
		}
	}
	set, err := templates.Load(o.templatesDir)
	if err != nil {
		return inputerr.SetHint(err, "pass the --templates folder the record was made with")
	}
	key, fp, err := loadPrivateKey(d, o.key, "--key", o.passphrase)
	if err != nil {
		return err
	}
	res, err := signing.Sign(signing.Request{Dir: o.dir, Role: o.role, Name: o.name, Key: key, Signers: signers, Templates: set, Now: d.now()})
	switch {
	case errors.Is(err, signing.ErrWording):
		return inputerr.SetHint(err, "pass the --templates folder the record was made with")
	case errors.Is(err, signing.ErrNoName):
		return inputerr.SetHint(err, "pass --name with your printed name")
	case errors.Is(err, signing.ErrSigner) && signers != nil && inputerr.HintOf(err) == "":
		return inputerr.SetHint(err, "sign with your own key, in a role the signers file gives you")
	case err != nil:
		return err
	}
	sigPath := filepath.Join(o.dir, signature.SignaturesFile)
	// Another signer may have signed since the folder was read: refuse to
	// replace their signature.
	now, err := os.ReadFile(sigPath)
	if err != nil && !errors.Is(err, os.ErrNotExist) {
		return inputerr.FromPath(err)
	}
	if !bytes.Equal(now, res.Previous) {
		return inputerr.Errorf("%s changed while this signature was made: someone else signed meanwhile", sigPath).WithHint("run the command again")
	}
	err = safewrite.Write([]safewrite.File{
		{Path: sigPath, Data: res.SignaturesFile},
		{Path: filepath.Join(o.dir, record.PDFFile), Data: res.PDF},
	}, safewrite.Options{Replace: true, InExistingFolder: true})
	if err != nil {
		return err
	}
	m := res.Signature
	if signers == nil {
		fmt.Fprintf(d.stderr, "probity: note: key %s was not checked against a signers file; verify checks it with --signers\n", fp)
	}
	fmt.Fprintf(d.stdout, "signed record %s as %s: %s, %s UTC, key %s\n", res.Record.RecordID, m.Role, m.Name,
		m.SignedAt.UTC().Format("2006-01-02 15:04:05"), fp)
	fmt.Fprintf(d.stdout, "meaning: %s\n", m.Meaning)
	fmt.Fprintf(d.stdout, "signature %d in %s; %s rendered again with it shown (%s)\n", m.Sequence, sigPath, filepath.Join(o.dir, record.PDFFile), res.Paper)
	if len(res.Unsigned) > 0 {
		fmt.Fprintf(d.stdout, "not yet signed: %s\n", strings.Join(res.Unsigned, ", "))
	} else {
		fmt.Fprintln(d.stdout, "every role is signed")
	}
	return nil
}
