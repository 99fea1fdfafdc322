package server

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"
)

// sgrColour matches a colour in an escape sequence (a foreground of the
// 256-colour palette, or of the 16).
var sgrColour = regexp.MustCompile(`\x1b\[[0-9;]*(38;5;[0-9]+|3[0-7])[0-9;]*m`)

// A fellow connects with a real SSH client, gets the explorer in a terminal
// of the size asked for, nudges a lever, resizes the window, and quits with
// exit status 0.
func TestExplorerOverSSH(t *testing.T) {
	l := startLab(t, nil)
	tm := openTerm(t, l.dial(t, "alice", l.alice), "xterm-256color", 120, 40)
	tm.waitFor("pvcouple", "Opened preset normal", "Filling pressure")
	tm.keys("k")
	tm.waitFor("Filling pressure 10 → 11 mmHg · SV")
	if !sgrColour.MatchString(tm.raw()) {
		t.Error("no colour on an xterm-256color terminal")
	}
	// Resizes reach the explorer: too small a window says so, a large one
	// shows the explorer again.
	if err := tm.sess.WindowChange(20, 60); err != nil {
		t.Fatal(err)
	}
	tm.waitFor("this one is 60×20")
	tm.mark()
	if err := tm.sess.WindowChange(40, 120); err != nil {
		t.Fatal(err)
	}
	tm.waitFor("Filling pressure 10 → 11 mmHg · SV") // drawn again at 120×40
	tm.keys("k")
	tm.waitFor("Filling pressure 11 → 12 mmHg · SV")
	tm.keys("q")
	if code := tm.exit(); code != 0 {
		t.Errorf("exit status %d after q, want 0", code)
	}
	log := l.log.String()
	for _, want := range []string{"msg=connect session=1 fellow=alice login=alice", "term=xterm-256color cols=120 rows=40",
		"msg=disconnect session=1 fellow=alice reason=quit"} {
		if !strings.Contains(log, want) {
			t.Errorf("the log lacks %q:\n%s", want, log)
		}
	}
}

// Each session has its own colour profile: NO_COLOR or a dumb terminal in
// one session gives no colour there while another session has colour.
func TestColourPerSession(t *testing.T) {
	l := startLab(t, nil)
	colour := openTerm(t, l.dial(t, "alice", l.alice), "xterm-256color", 100, 30)
	plain := openTerm(t, l.dial(t, "bob", l.bob), "xterm-256color", 100, 30, "NO_COLOR=1")
	dumb := openTerm(t, l.dial(t, "bob", l.bob), "dumb", 100, 30)
	for _, tm := range []*term{colour, plain, dumb} {
		tm.waitFor("Opened preset normal")
		tm.keys("k")
		tm.waitFor("11 mmHg · SV")
	}
	if !sgrColour.MatchString(colour.raw()) {
		t.Error("no colour in the session with xterm-256color")
	}
	if m := sgrColour.FindString(plain.raw()); m != "" {
		t.Errorf("colour %q in the session with NO_COLOR", m)
	}
	if m := sgrColour.FindString(dumb.raw()); m != "" {
		t.Errorf("colour %q on a dumb terminal", m)
	}
	for _, tm := range []*term{colour, plain, dumb} {
		tm.keys("q")
		if code := tm.exit(); code != 0 {
			t.Errorf("exit status %d", code)
		}
	}
}

// Identity comes from the key: alice's key asking for bob's login name, or
// for a name with a slash or dots, still gets alice's folder, and never
// bob's files.
func TestKeyNotLoginNamePicksTheFolder(t *testing.T) {
	l := startLab(t, nil)
	bobs := filepath.Join(l.data, "users", "bob")
	if err := os.MkdirAll(bobs, 0o750); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(bobs, "bob-secret.yaml"), []byte("version: 1\n"), 0o640); err != nil {
		t.Fatal(err)
	}
	for i, login := range []string{"bob", "../bob", "a/b", "../../etc"} {
		tm := openTerm(t, l.dial(t, login, l.alice), "xterm", 100, 30)
		tm.waitFor("Opened preset normal")
		name := []string{"one", "two", "three", "four"}[i]
		tm.keys("s\x15" + name + "\r") // Ctrl-U clears the name offered
		tm.waitFor("Saved levers and baseline to " + name + ".yaml in your folder (alice)")
		tm.keys("o")
		tm.waitFor("Open a scenario", "one.yaml")
		if strings.Contains(tm.text(), "bob-secret") {
			t.Errorf("login %q with alice's key listed bob's file", login)
		}
		tm.keys("\x1bq")
		if code := tm.exit(); code != 0 {
			t.Errorf("exit status %d", code)
		}
		if _, err := os.Stat(filepath.Join(l.data, "users", "alice", name+".yaml")); err != nil {
			t.Errorf("login %q: the save is not in alice's folder: %v", login, err)
		}
	}
	entries, _ := os.ReadDir(filepath.Join(l.data, "users"))
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	if strings.Join(names, ",") != "alice,bob" {
		t.Errorf("folders under users: %v, want alice and bob only", names)
	}
	if !strings.Contains(l.log.String(), `fellow=alice login=../../etc`) {
		t.Errorf("the log does not give the login asked for beside the fellow:\n%s", l.log.String())
	}
}

// A save with a path in the name is refused on screen and writes nothing
// outside the fellow's folder; a shared file can be opened but not saved
// over.
func TestSaveAndOpenStayInTheFolders(t *testing.T) {
	l := startLab(t, nil)
	shared := filepath.Join(l.data, "shared", "scenarios")
	if err := os.MkdirAll(shared, 0o755); err != nil {
		t.Fatal(err)
	}
	scenario := "version: 1\nname: lab-hr90\nbase: normal\nparams:\n  heart_rate_bpm: 90\n"
	if err := os.WriteFile(filepath.Join(shared, "lab-hr90.yaml"), []byte(scenario), 0o644); err != nil {
		t.Fatal(err)
	}
	// A link out of the fellow's folder is neither listed nor followed.
	if err := os.MkdirAll(filepath.Join(l.data, "users", "bob"), 0o750); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(filepath.Join(l.dir, "authorized_keys"), filepath.Join(l.data, "users", "bob", "keys.yaml")); err != nil {
		t.Fatal(err)
	}
	tm := openTerm(t, l.dial(t, "bob", l.bob), "xterm", 110, 34)
	tm.waitFor("Opened preset normal")
	for _, bad := range []string{"../escape", "/tmp/escape", "shared/scenarios/lab-hr90", ".hidden"} {
		tm.keys("s\x15" + bad + "\r")
		tm.waitFor(`cannot save as "` + bad + `"`)
	}
	tm.keys("o")
	tm.waitFor("shared/scenarios/lab-hr90.yaml")
	if strings.Contains(tm.text(), "keys.yaml") {
		t.Error("a link out of the folder was listed")
	}
	tm.keys("\r")
	tm.waitFor("Opened shared/scenarios/lab-hr90.yaml (lab-hr90)")
	tm.keys("q")
	tm.exit()
	for _, p := range []string{filepath.Join(l.dir, "escape.yaml"), "/tmp/escape.yaml", filepath.Join(l.data, "users", "escape.yaml")} {
		if _, err := os.Stat(p); err == nil {
			t.Errorf("%s was written", p)
		}
	}
	got, _ := os.ReadFile(filepath.Join(shared, "lab-hr90.yaml"))
	if string(got) != scenario {
		t.Error("the shared file changed")
	}
}

// The session limit: a session beyond it is told why and closed with exit
// status 1; the sessions open go on.
func TestSessionLimit(t *testing.T) {
	l := startLab(t, func(c *Config) { c.MaxSessions = 1 })
	first := openTerm(t, l.dial(t, "alice", l.alice), "xterm", 100, 30)
	first.waitFor("Opened preset normal")
	second := openTerm(t, l.dial(t, "bob", l.bob), "xterm", 100, 30)
	if code := second.exit(); code != 1 {
		t.Errorf("exit status %d beyond the limit, want 1", code)
	}
	if txt := second.text(); !strings.Contains(txt, "has 1 sessions open, its limit; try again later") {
		t.Errorf("the refused session was told %q", txt)
	}
	first.keys("k")
	first.waitFor("11 mmHg · SV")
	first.keys("q")
	if code := first.exit(); code != 0 {
		t.Errorf("exit status %d", code)
	}
}

// An idle session is told and closed; typing keeps a session open.
func TestIdleTimeout(t *testing.T) {
	const idle = 400 * time.Millisecond
	l := startLab(t, func(c *Config) { c.IdleTimeout = idle })
	tm := openTerm(t, l.dial(t, "alice", l.alice), "xterm", 100, 30)
	tm.waitFor("Opened preset normal")
	start := time.Now()
	for range 6 { // a key every 150 ms for 750 ms, well past one timeout
		tm.keys("k")
		time.Sleep(150 * time.Millisecond)
	}
	tm.waitFor("16 mmHg · SV")
	code := tm.exit()
	if took := time.Since(start); took < 750*time.Millisecond+idle {
		t.Errorf("closed %v after the first key, while typing", took)
	}
	if code != 1 || !strings.Contains(tm.text(), "closed after 400ms without a key pressed") {
		t.Errorf("exit status %d, told %q", code, lastChars(tm.text(), 200))
	}
	if !strings.Contains(l.log.String(), "reason=idle") {
		t.Error("the log does not say the session was idle")
	}
}
