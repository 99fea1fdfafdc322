package server

import (
	"strings"
	"testing"
)

// Names come from a name="…" option or the key's comment, and must be short,
// lower case and free of separators; the format is OpenSSH's authorized_keys
// (sshd(8), AUTHORIZED_KEYS FILE FORMAT).
func TestAuthorizedKeys(t *testing.T) {
	a, b := newKey(t), newKey(t)
	good := "# the lab's fellows\n\n" +
		a.line(`name="alice"`, "alice@laptop") +
		b.line("", "bob") +
		"   " + a.line(`restrict,name="alice",no-agent-forwarding`, "alice@desktop") // the same fellow again
	r, err := ParseAuthorizedKeys([]byte(good), "keys")
	if err != nil {
		t.Fatal(err)
	}
	if n, ok := r.Lookup(a.pub); !ok || n != "alice" {
		t.Errorf("alice's key: %q %v", n, ok)
	}
	if n, ok := r.Lookup(b.pub); !ok || n != "bob" {
		t.Errorf("bob's key: %q %v", n, ok)
	}
	if _, ok := r.Lookup(newKey(t).pub); ok {
		t.Error("a key not in the file was found")
	}
	if r.Len() != 2 || r.Fellows() != 2 {
		t.Errorf("%d keys of %d fellows, want 2 and 2", r.Len(), r.Fellows())
	}

	for _, c := range []struct{ name, file, want string }{
		{"comment with a host", a.line("", "alice@laptop"), `keys:1: the comment is taken as the fellow's name: name "alice@laptop"`},
		{"no name at all", a.line("", ""), "keys:1: no name for this key"},
		{"capitals", a.line(`name="Alice"`, ""), `keys:1: name "Alice"`},
		{"a slash", a.line(`name="a/b"`, ""), `name "a/b"`},
		{"dot dot", a.line(`name=".."`, ""), `name ".."`},
		{"a dot", a.line("", "."), `name "."`},
		{"too long", a.line(`name="`+strings.Repeat("a", 33)+`"`, ""), "1 to 32"},
		{"empty name", a.line(`name=""`, ""), `name ""`},
		{"unquoted name", a.line(`name=alice`, ""), "double quotes"},
		{"two names", a.line(`name="a",name="b"`, ""), "two name= options"},
		{"a command", a.line(`command="/bin/sh"`, "alice"), `option "command=\"/bin/sh\"" is not supported`},
		{"from", a.line(`from="10.0.0.0/8"`, "alice"), "is not supported"},
		{"garbage", "ssh-ed25519 not-base64 alice\n", "keys:1: not an OpenSSH public key line"},
		{"one key, two fellows", a.line("", "alice") + "\n" + a.line("", "mallory"),
			`keys:3: this key is also on line 1 for "alice"`},
	} {
		_, err := ParseAuthorizedKeys([]byte(c.file), "keys")
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want %q", c.name, err, c.want)
		}
	}
}

// CheckName: the pattern of the issue, [a-z0-9._-]{1,32}, less dots alone.
func TestCheckName(t *testing.T) {
	for _, ok := range []string{"alice", "a", "dr.smith", "fellow_2", "a-b", strings.Repeat("z", 32), "...a"} {
		if err := CheckName(ok); err != nil {
			t.Errorf("%q refused: %v", ok, err)
		}
	}
	for _, bad := range []string{"", ".", "..", "...", "Alice", "a b", "a/b", `a\b`, "é", strings.Repeat("z", 33), "a\x00"} {
		if CheckName(bad) == nil {
			t.Errorf("%q taken", bad)
		}
	}
}
