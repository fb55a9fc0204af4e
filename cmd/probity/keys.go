package main

import (
	"bytes"
	"crypto/ed25519"
	"errors"
	"fmt"
	"os"

	"github.com/spf13/cobra"

	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"probity/plan/record/signature"
)

// passphraseEnv is the environment variable a script gives a key's
// passphrase in.
const passphraseEnv = "PROBITY_PASSPHRASE"

// passphraseHelp explains, in each command's help, where a passphrase
// comes from.
const passphraseHelp = `A private key protected by a passphrase (probity keygen --protect, or
ssh-keygen -p -f KEY) is opened with the passphrase from --passphrase-file
(its first line), else from the environment variable ` + passphraseEnv + `,
else asked for on the terminal. A key stored in the clear is used with a
warning: anyone who can read the file can sign with it.`

// passphraseSource is where a command takes a key's passphrase from.
type passphraseSource struct {
	file string
}

// addPassphraseFlag adds --passphrase-file.
func addPassphraseFlag(cmd *cobra.Command, p *passphraseSource) {
	cmd.Flags().StringVar(&p.file, "passphrase-file", "", "read the private key's passphrase from the first line of `FILE` (or set "+passphraseEnv+")")
}

// get returns the passphrase: from the file, the environment or the
// terminal (asked twice when confirm is set); an input error when none of
// them can give one.
func (p passphraseSource) get(d deps, what string, confirm bool) ([]byte, error) {
	if p.file != "" {
		data, err := inputfile.ReadFile(p.file, "passphrase file", inputfile.SmallLimit)
		if err != nil {
			return nil, err
		}
		line, _, _ := bytes.Cut(data, []byte("\n"))
		line = bytes.TrimSuffix(line, []byte("\r"))
		if len(line) == 0 {
			return nil, inputerr.At(p.file, 1, "", "the first line is empty; it must hold the passphrase")
		}
		return line, nil
	}
	if v := d.env(passphraseEnv); v != "" {
		return []byte(v), nil
	}
	if d.readPassword == nil {
		return nil, inputerr.Errorf("%s needs a passphrase, and there is no terminal to ask for it", what).
			WithHint("pass --passphrase-file FILE or set " + passphraseEnv)
	}
	pass, err := d.readPassword("passphrase for " + what + ": ")
	if err != nil {
		return nil, inputerr.Errorf("reading the passphrase: %v", err)
	}
	if confirm {
		again, err := d.readPassword("the same passphrase again: ")
		if err != nil {
			return nil, inputerr.Errorf("reading the passphrase: %v", err)
		}
		if !bytes.Equal(pass, again) {
			return nil, inputerr.Errorf("the two passphrases differ").WithHint("run the command again")
		}
	}
	return pass, nil
}

// loadPrivateKey reads a private key file (flag names the flag that gave
// it) and returns it with its public key's fingerprint, asking for the
// passphrase of a protected key. It warns on stderr about a key stored in
// the clear, readable by others, or published with the demo.
func loadPrivateKey(d deps, path, flag string, pass passphraseSource) (ed25519.PrivateKey, string, error) {
	data, err := inputfile.ReadFile(path, "private key", inputfile.SmallLimit)
	if errors.Is(err, os.ErrNotExist) {
		return nil, "", inputerr.Errorf("cannot read %s %s: %v", flag, path, messageOf(err)).WithHint("make a key pair with 'probity keygen --out NAME'")
	}
	if err != nil {
		return nil, "", err
	}
	priv, prot, err := signature.ReadPrivate(data, path, func() ([]byte, error) { return pass.get(d, "the key "+path, false) })
	switch {
	case errors.Is(err, signature.ErrPassphrase):
		return nil, "", inputerr.SetHint(err, "give the passphrase the key was protected with (--passphrase-file FILE, "+passphraseEnv+", or the terminal)")
	case err != nil && inputerr.HintOf(err) == "":
		return nil, "", inputerr.SetHint(err, "pass the private key file written by probity keygen (not the .pub file); a key protected by openssl is not read, protect it with ssh-keygen -p -f KEY instead")
	case err != nil:
		return nil, "", err
	}
	fp := signature.Fingerprint(priv.Public().(ed25519.PublicKey))
	switch {
	case signature.IsDemoKey(fp):
		fmt.Fprintf(d.stderr, "probity: warning: %s is a published demonstration key: what it signs is a demonstration and authenticates nothing\n", path)
	case prot == signature.Clear:
		fmt.Fprintf(d.stderr, "probity: warning: the private key %s is stored in the clear: anyone who can read the file can sign with it; protect it with a passphrase (ssh-keygen -p -f %s)\n", path, path)
	}
	if st, err := os.Stat(path); err == nil && st.Mode().Perm()&0o077 != 0 {
		fmt.Fprintf(d.stderr, "probity: warning: the private key %s can be read by others (mode %04o); run chmod 600 %s\n", path, st.Mode().Perm(), path)
	}
	return priv, fp, nil
}

// loadPublicKey reads a public key file written by keygen.
func loadPublicKey(path string) (ed25519.PublicKey, error) {
	data, err := inputfile.ReadFile(path, "public key", inputfile.SmallLimit)
	if errors.Is(err, os.ErrNotExist) {
		return nil, inputerr.Errorf("cannot read --pub %s: %v", path, messageOf(err)).WithHint("pass the NAME.pub file written by probity keygen")
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

// loadSigners reads a signers file.
func loadSigners(path string) (*signature.Signers, error) {
	data, err := inputfile.ReadFile(path, "signers file", inputfile.SmallLimit)
	if err != nil {
		return nil, err
	}
	s, err := signature.ParseSigners(data, path)
	if err != nil && inputerr.HintOf(err) == "" {
		return nil, inputerr.SetHint(err, "see 'probity sign --help' for the signers file")
	}
	return s, err
}

// signersHelp describes the signers file, in the help of sign, verify and
// trend.
const signersHelp = `The signers file (YAML) says whose key signs in which role; it is what
the people's signatures are checked against, so it is kept by whoever
answers for the records, not by the signers:

  signers:
    - name: Dana Example
      roles: [prepared]
      key: sha256:…        # the fingerprint probity keygen prints
    - name: Jo Example
      roles: [reviewed, approved]
      key: sha256:…
    - name: Audit operations
      roles: [operator]    # may seal records (record --sign-key)
      key: sha256:…`
