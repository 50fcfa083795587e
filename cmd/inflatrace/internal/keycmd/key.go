// Package keycmd implements "inflatrace key": the user's signing key (an
// ed25519 key in OpenSSH format, kept outside the ledger in the user's
// configuration folder), with which export signs a release's manifest.
package keycmd

import (
	"errors"
	"fmt"
	"io/fs"
	"os"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/archive"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/sshsig"
)

// Options are the parsed flags of key.
type Options struct {
	Env    *app.Env
	Rotate bool
}

// NewCmd returns the key command.
func NewCmd(env *app.Env) *cobra.Command {
	opts := &Options{Env: env}
	cmd := &cobra.Command{
		Use:   "key [--rotate]",
		Short: "Show (or replace) your signing key, with which export signs releases",
		Long: `key prints your signing key: its file, its SHA-256 fingerprint, and the line
a referee puts into an allowed_signers file to check your releases with
ssh-keygen -Y verify. The key is made on first use. --rotate replaces it with
a new one; the old one is kept beside it, renamed with the date, so that
releases signed with it can still be checked against its public half, and
the ledger's nodes and seals made under it are still trusted and reused.
Deleting a retired key revokes it: what only it vouched for is computed
again (and, where the rows differ, quarantined) instead of reused.
Keys you trust (a colleague's, for import) go into allowed_signers in the
same folder, one "name ssh-ed25519 AAAA..." line each.`,
		Args: cobra.NoArgs,
		RunE: func(c *cobra.Command, _ []string) error { return Run(opts) },
	}
	cmd.Flags().BoolVar(&opts.Rotate, "rotate", false, "replace the key with a new one (the old one is kept, renamed)")
	return cmd
}

// Run shows or rotates the key.
func Run(o *Options) error {
	p, err := o.Env.KeyPath()
	if err != nil {
		return err
	}
	if o.Rotate {
		if _, err := os.Stat(p); err == nil {
			old := p + ".retired-" + o.Env.Now().UTC().Format("20060102T150405Z")
			for _, suffix := range []string{"", ".pub"} {
				if err := os.Rename(p+suffix, old+suffix); err != nil && !errors.Is(err, fs.ErrNotExist) {
					return err
				}
			}
			fmt.Fprintf(o.Env.Stderr, "retired the old key as %s\n", old)
		}
	}
	s, err := o.Env.SigningKey()
	if err != nil {
		return err
	}
	w := o.Env.Stdout
	fmt.Fprintf(w, "key          %s\nfingerprint  %s\nsigners line %s\n", p, sshsig.Fingerprint(s.PublicKey()), sshsig.AllowedLine(o.Env.Principal(), s.PublicKey()))
	d, _ := o.Env.ConfigDir()
	fmt.Fprintf(w, "trusted keys %s/allowed_signers\nreferees run ssh-keygen -Y verify -f allowed_signers -I %s -n %s -s %s < %s\n",
		d, o.Env.Principal(), archive.SignatureNamespace, archive.SignatureName, archive.ManifestName)
	return nil
}
