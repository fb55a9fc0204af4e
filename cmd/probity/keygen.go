package main

import (
	"crypto/ed25519"
	"errors"
	"fmt"
	"os"

	"github.com/spf13/cobra"

	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"probity/plan/record/signature"
	"probity/sampling/safewrite"
)

// keygenOptions are the flags of probity keygen.
type keygenOptions struct {
	out string
}

// newKeygenCommand builds `probity keygen`.
func newKeygenCommand(d deps) *cobra.Command {
	opts := &keygenOptions{}
	cmd := &cobra.Command{
		Use:   "keygen --out NAME",
		Short: "Make an Ed25519 key pair for signing acceptance records",
		Long: `keygen writes an Ed25519 key pair: the private key to NAME (PEM, PKCS #8,
readable by you only: mode 0600) and the public key to NAME.pub (PEM). It
never overwrites an existing file. Give the private key to 'probity record
--sign-key NAME' and the public key to whoever checks the records with
'probity verify RECDIR --pub NAME.pub'. The private key is not encrypted:
keep it where only the signer can read it.

` + exitHelp("success: the key pair was written", "", true),
		Args: cobra.NoArgs,
		PreRunE: func(cmd *cobra.Command, args []string) error {
			if opts.out == "" {
				return inputerr.Errorf("--out is required").WithHint("for example: probity keygen --out audit-key")
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			return runKeygen(d, opts)
		},
	}
	cmd.Flags().StringVar(&opts.out, "out", "", "file `NAME` of the private key; the public key goes to NAME.pub")
	return cmd
}

func runKeygen(d deps, o *keygenOptions) error {
	pubPath := o.out + ".pub"
	for _, p := range []string{o.out, pubPath} {
		if _, err := os.Lstat(p); err == nil {
			return inputerr.Errorf("%s already exists; keygen never overwrites a key", p).WithHint("choose another --out name, or remove the old key pair yourself")
		}
	}
	pub, priv, err := signature.GenerateKey(d.random)
	if err != nil {
		return &internalError{msg: err.Error()}
	}
	privPEM, err := signature.MarshalPrivate(priv)
	if err != nil {
		return &internalError{msg: err.Error()}
	}
	pubPEM, err := signature.MarshalPublic(pub)
	if err != nil {
		return &internalError{msg: err.Error()}
	}
	err = safewrite.Write([]safewrite.File{{Path: o.out, Data: privPEM, Perm: 0o600}, {Path: pubPath, Data: pubPEM, Perm: 0o644}}, safewrite.Options{})
	if errors.Is(err, safewrite.ErrExists) {
		return inputerr.SetHint(err, "keygen never overwrites a key: choose another --out name, or remove the old key pair yourself")
	}
	if err != nil {
		return err
	}
	fmt.Fprintf(d.stdout, "private key: %s (mode 0600; keep it secret)\npublic key:  %s\nfingerprint: %s\n", o.out, pubPath, signature.Fingerprint(pub))
	return nil
}

// loadPrivateKey reads a private key file written by keygen and returns
// it with its public key's fingerprint.
func loadPrivateKey(path string) (ed25519.PrivateKey, string, error) {
	data, err := inputfile.ReadFile(path, "private key", inputfile.SmallLimit)
	if errors.Is(err, os.ErrNotExist) {
		return nil, "", inputerr.Errorf("cannot read --sign-key %s: %v", path, errors.Unwrap(err)).WithHint("make a key pair with 'probity keygen --out NAME'")
	}
	if err != nil {
		return nil, "", err
	}
	priv, err := signature.ParsePrivate(data, path)
	if err != nil {
		return nil, "", inputerr.SetHint(err, "pass the private key file written by probity keygen (not the .pub file)")
	}
	return priv, signature.Fingerprint(priv.Public().(ed25519.PublicKey)), nil
}

// loadPublicKey reads a public key file written by keygen.
func loadPublicKey(path string) (ed25519.PublicKey, error) {
	data, err := inputfile.ReadFile(path, "public key", inputfile.SmallLimit)
	if errors.Is(err, os.ErrNotExist) {
		return nil, inputerr.Errorf("cannot read --pub %s: %v", path, errors.Unwrap(err)).WithHint("pass the NAME.pub file written by probity keygen")
	}
	if err != nil {
		return nil, err
	}
	pub, err := signature.ParsePublic(data, path)
	if err != nil {
		return nil, inputerr.SetHint(err, "pass the NAME.pub file written by probity keygen")
	}
	return pub, nil
}
