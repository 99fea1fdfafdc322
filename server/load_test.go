//go:build load

package server

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	gossh "golang.org/x/crypto/ssh"
)

// The load test of the lab server: 20 sessions, each nudging a lever every
// 100 ms, against the real binary (`pvcouple serve`, GOMAXPROCS=2) on the
// loopback interface. Targets (from the server's specification): the first
// byte of the screen's answer to a nudge within 30 ms at the median and 100
// ms at the 95th percentile, and at most 40 MB of memory per session.
//
//	go test -tags load -run Load -v ./server/
//
// With PVCOUPLE_LOAD_MAP=1 one more session solves coupling maps all the
// while (it nudges the heart rate, so each map is replaced by a new one).
const (
	loadSessions = 20
	loadNudges   = 100 // per session: 10 s at one every 100 ms
	loadEvery    = 100 * time.Millisecond
)

// chunk is output read from a session and when it came.
type chunk struct {
	at   time.Time
	data []byte
}

// nudgeTimes is what one nudge took: to the first byte of output and to the
// status line with the solved loop's SV.
type nudgeTimes struct{ first, solved time.Duration }

func TestLoad(t *testing.T) {
	if testing.Short() {
		t.Skip("load test")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "pvcouple")
	if out, err := exec.Command("go", "build", "-o", bin, "pvcouple").CombinedOutput(); err != nil {
		t.Fatalf("build: %v\n%s", err, out)
	}
	keys := make([]fellowKey, loadSessions+1)
	var ak strings.Builder
	for i := range keys {
		keys[i] = newKey(t)
		ak.WriteString(keys[i].line(fmt.Sprintf(`name="fellow%02d"`, i), ""))
	}
	if err := os.WriteFile(filepath.Join(dir, "keys"), []byte(ak.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	data := filepath.Join(dir, "data")
	os.Mkdir(data, 0o755)
	port := freePort(t)
	addr := "127.0.0.1:" + strconv.Itoa(port)
	srv := exec.Command(bin, "serve", "--listen", addr, "--host-key", filepath.Join(dir, "host_key"),
		"--authorized-keys", filepath.Join(dir, "keys"), "--data", data, "--max-sessions", strconv.Itoa(loadSessions+1),
		"--log", filepath.Join(dir, "log"))
	srv.Env = append(os.Environ(), "GOMAXPROCS=2")
	if err := srv.Start(); err != nil {
		t.Fatal(err)
	}
	defer func() { srv.Process.Signal(os.Interrupt); srv.Wait() }()
	waitListening(t, addr)
	hostKey := readHostKey(t, filepath.Join(dir, "host_key"))
	time.Sleep(300 * time.Millisecond)
	idleRSS := rss(t, srv.Process.Pid)

	cfg := func(k fellowKey) *gossh.ClientConfig {
		return &gossh.ClientConfig{User: "fellow", Auth: []gossh.AuthMethod{gossh.PublicKeys(k.signer)},
			HostKeyCallback: gossh.FixedHostKey(hostKey), Timeout: 10 * time.Second}
	}
	withMap := os.Getenv("PVCOUPLE_LOAD_MAP") == "1"
	stopMap := make(chan struct{})
	var mapWG sync.WaitGroup
	if withMap {
		mapWG.Add(1)
		go func() {
			defer mapWG.Done()
			mapSession(t, addr, cfg(keys[loadSessions]), stopMap)
		}()
	}

	var mu sync.Mutex
	var all []nudgeTimes
	var peakRSS int64
	var wg sync.WaitGroup
	start := make(chan struct{})
	for i := range loadSessions {
		wg.Add(1)
		go func() {
			defer wg.Done()
			times, err := nudgeSession(addr, cfg(keys[i]), start)
			if err != nil {
				t.Errorf("session %d: %v", i, err)
			}
			mu.Lock()
			all = append(all, times...)
			mu.Unlock()
		}()
	}
	time.Sleep(3 * time.Second) // every session open and drawn
	connectedRSS := rss(t, srv.Process.Pid)
	close(start)
	done := make(chan struct{})
	go func() { wg.Wait(); close(done) }()
	for running := true; running; {
		select {
		case <-done:
			running = false
		case <-time.After(200 * time.Millisecond):
			peakRSS = max(peakRSS, rss(t, srv.Process.Pid))
		}
	}
	close(stopMap)
	mapWG.Wait()

	if len(all) < loadSessions*loadNudges*9/10 {
		t.Fatalf("only %d nudges answered of %d", len(all), loadSessions*loadNudges)
	}
	first := make([]time.Duration, len(all))
	solved := make([]time.Duration, len(all))
	for i, n := range all {
		first[i], solved[i] = n.first, n.solved
	}
	slices.Sort(first)
	slices.Sort(solved)
	q := func(s []time.Duration, p float64) time.Duration { return s[int(p*float64(len(s)-1))] }
	perSession := float64(max(peakRSS, connectedRSS)-idleRSS) / loadSessions / (1 << 20)
	total := float64(peakRSS) / loadSessions / (1 << 20)
	t.Logf("%d sessions × %d nudges every %v, server GOMAXPROCS=2, %d cores seen by the test, coupling map session: %v",
		loadSessions, loadNudges, loadEvery, runtime.NumCPU(), withMap)
	t.Logf("nudge → first byte: median %v, p95 %v, max %v", q(first, 0.5), q(first, 0.95), first[len(first)-1])
	t.Logf("nudge → solved status line: median %v, p95 %v, max %v", q(solved, 0.5), q(solved, 0.95), solved[len(solved)-1])
	t.Logf("server RSS: idle %.1f MB, %d sessions drawn %.1f MB, peak %.1f MB; per session %.2f MB above idle (%.2f MB of the whole)",
		mb(idleRSS), loadSessions, mb(connectedRSS), mb(peakRSS), perSession, total)
	if q(first, 0.5) > 30*time.Millisecond || q(first, 0.95) > 100*time.Millisecond {
		t.Errorf("first byte: median %v (target ≤ 30 ms), p95 %v (target ≤ 100 ms)", q(first, 0.5), q(first, 0.95))
	}
	if total > 40 {
		t.Errorf("%.1f MB per session, target ≤ 40 MB", total)
	}
}

func mb(n int64) float64 { return float64(n) / (1 << 20) }

// nudgeSession opens the explorer and, once start is closed, nudges the
// filling pressure up and down every loadEvery, timing each answer.
func nudgeSession(addr string, cfg *gossh.ClientConfig, start <-chan struct{}) ([]nudgeTimes, error) {
	c, err := gossh.Dial("tcp", addr, cfg)
	if err != nil {
		return nil, err
	}
	defer c.Close()
	sess, chunks, in, err := shell(c)
	if err != nil {
		return nil, err
	}
	defer sess.Close()
	if err := waitChunk(chunks, "Opened preset normal", 10*time.Second); err != nil {
		return nil, err
	}
	<-start
	var times []nudgeTimes
	next := time.Now()
	for i := range loadNudges {
		time.Sleep(time.Until(next))
		next = next.Add(loadEvery)
		drain(chunks)
		key := "k"
		if i%2 == 1 {
			key = "j"
		}
		t0 := time.Now()
		if _, err := io.WriteString(in, key); err != nil {
			return times, err
		}
		var n nudgeTimes
		var tail []byte
		deadline := time.After(5 * time.Second)
		for n.solved == 0 {
			select {
			case ch, ok := <-chunks:
				if !ok {
					return times, io.EOF
				}
				if n.first == 0 {
					n.first = ch.at.Sub(t0)
				}
				tail = append(tail, ch.data...)
				if bytes.Contains(tail, []byte("mmHg · SV ")) {
					n.solved = ch.at.Sub(t0)
				}
				if len(tail) > 64 {
					tail = tail[len(tail)-64:]
				}
			case <-deadline:
				return times, fmt.Errorf("nudge %d: no solved status within 5 s", i)
			}
		}
		times = append(times, n)
	}
	io.WriteString(in, "q")
	return times, nil
}

// mapSession keeps a coupling map being solved: view 4, heart rate
// selected, nudged every 300 ms so that each map is replaced by a new one.
func mapSession(t *testing.T, addr string, cfg *gossh.ClientConfig, stop <-chan struct{}) {
	c, err := gossh.Dial("tcp", addr, cfg)
	if err != nil {
		t.Error(err)
		return
	}
	defer c.Close()
	sess, chunks, in, err := shell(c)
	if err != nil {
		t.Error(err)
		return
	}
	defer sess.Close()
	waitChunk(chunks, "Opened preset normal", 10*time.Second)
	io.WriteString(in, "4lll") // the map; heart rate is the fourth lever
	for i := 0; ; i++ {
		select {
		case <-stop:
			io.WriteString(in, "q")
			return
		case <-time.After(300 * time.Millisecond):
		}
		drain(chunks)
		io.WriteString(in, []string{"k", "j"}[i%2])
	}
}

// shell opens a 120×40 xterm-256color terminal with the explorer.
func shell(c *gossh.Client) (*gossh.Session, chan chunk, io.Writer, error) {
	sess, err := c.NewSession()
	if err != nil {
		return nil, nil, nil, err
	}
	if err := sess.RequestPty("xterm-256color", 40, 120, gossh.TerminalModes{}); err != nil {
		return nil, nil, nil, err
	}
	in, _ := sess.StdinPipe()
	out, _ := sess.StdoutPipe()
	chunks := make(chan chunk, 1024)
	go func() {
		defer close(chunks)
		buf := make([]byte, 64<<10)
		for {
			n, err := out.Read(buf)
			if n > 0 {
				chunks <- chunk{time.Now(), slices.Clone(buf[:n])}
			}
			if err != nil {
				return
			}
		}
	}()
	if err := sess.Shell(); err != nil {
		return nil, nil, nil, err
	}
	return sess, chunks, in, nil
}

// waitChunk reads output until it holds s.
func waitChunk(chunks chan chunk, s string, d time.Duration) error {
	var all []byte
	deadline := time.After(d)
	for {
		select {
		case ch, ok := <-chunks:
			if !ok {
				return io.EOF
			}
			all = append(all, ch.data...)
			if bytes.Contains(all, []byte(s)) {
				return nil
			}
		case <-deadline:
			return fmt.Errorf("never saw %q", s)
		}
	}
}

// drain drops the output waiting to be read.
func drain(chunks chan chunk) {
	for {
		select {
		case <-chunks:
		default:
			return
		}
	}
}

func freePort(t *testing.T) int {
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	defer ln.Close()
	return ln.Addr().(*net.TCPAddr).Port
}

func waitListening(t *testing.T, addr string) {
	for range 100 {
		if c, err := net.Dial("tcp", addr); err == nil {
			c.Close()
			return
		}
		time.Sleep(50 * time.Millisecond)
	}
	t.Fatal("the server never listened")
}

func readHostKey(t *testing.T, path string) gossh.PublicKey {
	for range 50 {
		if b, err := os.ReadFile(path); err == nil {
			s, err := gossh.ParsePrivateKey(b)
			if err == nil {
				return s.PublicKey()
			}
		}
		time.Sleep(50 * time.Millisecond)
	}
	t.Fatal("no host key")
	return nil
}

// rss is a process's resident memory in bytes (Linux /proc).
func rss(t *testing.T, pid int) int64 {
	f, err := os.Open(fmt.Sprintf("/proc/%d/status", pid))
	if err != nil {
		t.Skip("no /proc:", err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if rest, ok := strings.CutPrefix(sc.Text(), "VmRSS:"); ok {
			kb, _ := strconv.ParseInt(strings.Fields(rest)[0], 10, 64)
			return kb << 10
		}
	}
	return 0
}
