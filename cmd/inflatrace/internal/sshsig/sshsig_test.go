package sshsig

import (
	"crypto/ed25519"
	"crypto/rand"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"golang.org/x/crypto/ssh"
)

func newKey(t *testing.T) (ssh.Signer, ed25519.PrivateKey) {
	t.Helper()
	_, priv, err := ed25519.GenerateKey(rand.Reader)
	if err != nil {
		t.Fatal(err)
	}
	s, err := ssh.NewSignerFromKey(priv)
	if err != nil {
		t.Fatal(err)
	}
	return s, priv
}

// A signature verifies for its message and namespace, and for no other
// message, namespace or damaged armor (property).
func TestSignVerify(t *testing.T) {
	s, _ := newKey(t)
	msg := []byte("manifest bytes\n")
	sig, err := Sign(s, "inflatrace-release", msg)
	if err != nil {
		t.Fatal(err)
	}
	pub, err := Verify(sig, "inflatrace-release", msg)
	if err != nil || Fingerprint(pub) != Fingerprint(s.PublicKey()) {
		t.Fatalf("Verify: %v, key %v", err, pub)
	}
	if _, err := Verify(sig, "inflatrace-release", []byte("manifest bytes!\n")); err == nil {
		t.Error("a signature verifies for another message")
	}
	if _, err := Verify(sig, "other", msg); err == nil {
		t.Error("a signature verifies for another namespace")
	}
	bad := []byte(strings.Replace(string(sig), "A", "B", 1))
	if _, err := Verify(bad, "inflatrace-release", msg); err == nil && string(bad) != string(sig) {
		t.Error("a damaged signature verifies")
	}
}

// Interoperability with OpenSSH's own implementation (ssh-keygen -Y, the
// reference verifier of the format): ssh-keygen verifies what Sign writes,
// and Verify accepts what ssh-keygen -Y sign writes.
func TestOpenSSHInterop(t *testing.T) {
	keygen, err := exec.LookPath("ssh-keygen")
	if err != nil {
		if os.Getenv("INFLATRACE_SSH_E2E") != "" {
			t.Fatal("INFLATRACE_SSH_E2E is set but ssh-keygen is not installed (.ci/openssh.sh)")
		}
		t.Skip("ssh-keygen not installed")
	}
	dir := t.TempDir()
	s, priv := newKey(t)
	pemBlock, err := ssh.MarshalPrivateKey(priv, "test")
	if err != nil {
		t.Fatal(err)
	}
	keyFile := filepath.Join(dir, "id")
	if err := os.WriteFile(keyFile, pemEncode(pemBlock.Type, pemBlock.Bytes), 0o600); err != nil {
		t.Fatal(err)
	}
	allowed := filepath.Join(dir, "allowed_signers")
	if err := os.WriteFile(allowed, []byte(AllowedLine("referee@example", s.PublicKey())+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	msgFile := filepath.Join(dir, "manifest.json")
	msg := []byte("{\"files\": []}\n")
	if err := os.WriteFile(msgFile, msg, 0o644); err != nil {
		t.Fatal(err)
	}
	sig, err := Sign(s, "inflatrace-release", msg)
	if err != nil {
		t.Fatal(err)
	}
	sigFile := msgFile + ".sig"
	if err := os.WriteFile(sigFile, sig, 0o644); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(keygen, "-Y", "verify", "-f", allowed, "-I", "referee@example", "-n", "inflatrace-release", "-s", sigFile)
	cmd.Stdin = strings.NewReader(string(msg))
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("ssh-keygen -Y verify of our signature: %v\n%s", err, out)
	}
	// And the other way.
	os.Remove(sigFile)
	sign := exec.Command(keygen, "-Y", "sign", "-f", keyFile, "-n", "inflatrace-release", msgFile)
	if out, err := sign.CombinedOutput(); err != nil {
		t.Fatalf("ssh-keygen -Y sign: %v\n%s", err, out)
	}
	theirs, err := os.ReadFile(sigFile)
	if err != nil {
		t.Fatal(err)
	}
	pub, err := Verify(theirs, "inflatrace-release", msg)
	if err != nil || Fingerprint(pub) != Fingerprint(s.PublicKey()) {
		t.Errorf("Verify of ssh-keygen's signature: %v", err)
	}
	signers, err := ParseAllowed(allowed, []byte(AllowedLine("referee@example", s.PublicKey())))
	if err != nil {
		t.Fatal(err)
	}
	if got, ok := Find(signers, pub); !ok || got.Principals != "referee@example" {
		t.Errorf("Find: %v %v", got, ok)
	}
}

// Processes that make the key at once (a cluster's shards) agree on one.
func TestLoadOrCreateRace(t *testing.T) {
	path := filepath.Join(t.TempDir(), "cfg", "signing_key")
	const n = 16
	keys := make(chan string, n)
	errs := make(chan error, n)
	for range n {
		go func() {
			s, _, err := LoadOrCreate(path, "race")
			if err != nil {
				errs <- err
				return
			}
			keys <- Fingerprint(s.PublicKey())
		}()
	}
	seen := map[string]bool{}
	for range n {
		select {
		case err := <-errs:
			t.Fatalf("LoadOrCreate: %v", err)
		case k := <-keys:
			seen[k] = true
		}
	}
	if len(seen) != 1 {
		t.Errorf("%d different keys from %d simultaneous first uses, want 1", len(seen), n)
	}
}
