package main

import (
	"errors"
	"fmt"
	"os"

	"github.com/spf13/cobra"

	"probity/plan/inputerr"
	"probity/plan/record/signature"
	"probity/sampling/safewrite"
)

// keygenOptions are the flags of probity keygen.
type keygenOptions struct {
	out        string
	protect    bool
	passphrase passphraseSource
}

// newKeygenCommand builds `probity keygen`.
func newKeygenCommand(d deps) *cobra.Command {
	opts := &keygenOptions{}
	cmd := &cobra.Command{
		Use:   "keygen --out NAME",
		Short: "Make an Ed25519 key pair for signing acceptance records",
		Long: `keygen writes an Ed25519 key pair: the private key to NAME (readable by you
only: mode 0600) and the public key to NAME.pub (PEM), and prints the key's
fingerprint. It never overwrites an existing file.

With --protect the private key is encrypted under a passphrase, in the
OpenSSH private key format (bcrypt_pbkdf, AES-256-CTR; ssh-keygen reads it,
and 'ssh-keygen -p -f NAME' changes the passphrase). The passphrase, of at
least 10 characters, comes from --passphrase-file (its first line), else
from the environment variable ` + passphraseEnv + `, else it is asked for
twice on the terminal. Without --protect the private key is stored in the
clear (PEM, PKCS #8), and every command that signs with it warns.

A person signs records with 'probity sign RECDIR --key NAME'; whoever
answers for the records lists the fingerprint in the signers file that
'probity verify --signers' checks. An operator seals records with 'probity
record --sign-key NAME'; verify checks the seal with --pub NAME.pub.

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
	cmd.Flags().BoolVar(&opts.protect, "protect", false, "encrypt the private key under a passphrase")
	addPassphraseFlag(cmd, &opts.passphrase)
	return cmd
}

func runKeygen(d deps, o *keygenOptions) error {
	pubPath := o.out + ".pub"
	for _, p := range []string{o.out, pubPath} {
		if _, err := os.Lstat(p); err == nil {
			return inputerr.Errorf("%s already exists; keygen never overwrites a key", p).WithHint("choose another --out name, or remove the old key pair yourself")
		}
	}
	if o.passphrase.file != "" && !o.protect {
		return inputerr.Errorf("--passphrase-file needs --protect").WithHint("pass --protect to encrypt the private key under the passphrase")
	}
	var pass []byte
	if o.protect {
		var err error
		if pass, err = o.passphrase.get(d, "the new key "+o.out, true); err != nil {
			return err
		}
		if n := len([]rune(string(pass))); n < signature.MinPassphrase {
			return inputerr.Errorf("the passphrase has %d characters; use at least %d", n, signature.MinPassphrase)
		}
	}
	pub, priv, err := signature.GenerateKey(d.random)
	if err != nil {
		return &internalError{msg: err.Error()}
	}
	var privPEM []byte
	if o.protect {
		privPEM, err = signature.MarshalProtected(priv, pass)
	} else {
		privPEM, err = signature.MarshalPrivate(priv)
	}
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
	stored := "in the clear, mode 0600; keep it secret, or protect it: ssh-keygen -p -f " + o.out
	if o.protect {
		stored = "protected by the passphrase, mode 0600"
	}
	fmt.Fprintf(d.stdout, "private key: %s (%s)\npublic key:  %s\nfingerprint: %s\n", o.out, stored, pubPath, signature.Fingerprint(pub))
	return nil
}
