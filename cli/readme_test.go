package cli

import (
	"bufio"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// readmeCommands returns the command lines of the README's sh blocks, in
// order, without their comments.
func readmeCommands(t *testing.T) []string {
	t.Helper()
	f, err := os.Open(filepath.Join("..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var cmds []string
	in := false
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		switch {
		case strings.HasPrefix(line, "```"):
			in = !in && line == "```sh"
		case in:
			if i := strings.Index(line, " #"); i >= 0 {
				line = line[:i]
			}
			if line = strings.TrimSpace(line); line != "" {
				cmds = append(cmds, line)
			}
		}
	}
	return cmds
}

// Every example of the README runs, in order, from a clean folder holding
// only the binary and the example recordings, as a newcomer would type
// them; and whatever they write is listed in .gitignore, so that running
// them in the clone leaves it clean.
func TestReadmeExamplesRun(t *testing.T) {
	bin := buildBinary(t)
	dir := t.TempDir()
	if err := os.Symlink(bin, filepath.Join(dir, "pvcouple")); err != nil {
		t.Fatal(err)
	}
	recs := filepath.Join(dir, "testdata", "recordings")
	if err := os.MkdirAll(recs, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"occlusion-synthetic.csv", "steady-synthetic.csv", "saline-synthetic.csv", "mouse-synthetic.csv"} {
		data, err := os.ReadFile(filepath.Join("..", "testdata", "recordings", name))
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(recs, name), data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	setup := map[string]bool{"go run .": true, "go test ./...": true, "go build -o pvcouple .": true}
	ran := 0
	for _, line := range readmeCommands(t) {
		if setup[line] {
			continue
		}
		if !strings.HasPrefix(line, "./pvcouple ") {
			t.Errorf("README example %q does not run ./pvcouple", line)
			continue
		}
		cmd := exec.Command("sh", "-c", line)
		cmd.Dir = dir
		cmd.Env = []string{"PATH=" + os.Getenv("PATH"), "HOME=" + dir, "TERM=dumb"}
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Errorf("README example %q: %v\n%.2000s", line, err, out)
		}
		ran++
	}
	if ran < 20 {
		t.Errorf("ran %d README examples; the README has more", ran)
	}
	ignore, err := os.ReadFile(filepath.Join("..", ".gitignore"))
	if err != nil {
		t.Fatal(err)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if n := e.Name(); n != "pvcouple" && n != "testdata" && !strings.Contains(string(ignore), "\n/"+n+"\n") {
			t.Errorf("the README's examples write %s, which .gitignore does not list", n)
		}
	}
}
