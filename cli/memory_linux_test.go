package cli

import (
	"os"
	"os/exec"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"pvcouple/internal/synthrec"
	"pvcouple/presets"
)

// The reader streams: analysing 60 minutes recorded at 1 kHz (a synthetic
// recording made by the model: steady stretches and 15 caval occlusions of
// our own, seed 11) peaks below 150 MB of resident memory, and the CPU time
// grows linearly with the length (60 minutes take less than 6 times the CPU
// of 15; linear is 4, n·log n would be about 4.5 and quadratic 16). Measured
// on the real binary (peak RSS from the kernel's rusage of the child).
func TestAnalyzeLongRecordingMemory(t *testing.T) {
	if testing.Short() {
		t.Skip("writes and analyses 60 minutes of recording")
	}
	bin := buildBinary(t)
	dir := t.TempDir()
	sc, err := presets.Get("normal")
	if err != nil {
		t.Fatal(err)
	}
	run := func(minutes int) (rssMB float64, cpu time.Duration) {
		t.Helper()
		// 240 beats a cycle, about 206 s at 70 bpm.
		cycles := (minutes*60 + 205) / 206
		spec := synthrec.Spec{Params: sc.Params, SteadyBeats: 115, OcclusionBeats: 10, OcclusionStep: 0.88, RecoveryBeats: 115,
			Repeats: cycles, Rate: 1000, Seed: 11, NoiseP: 0.5, NoiseV: 0.5}
		path := filepath.Join(dir, "long.csv")
		f, err := os.Create(path)
		if err != nil {
			t.Fatal(err)
		}
		if err := synthrec.Stream(spec, f, "time_s", "pressure_mmhg", "volume_ml", 1); err != nil {
			t.Fatal(err)
		}
		if err := f.Close(); err != nil {
			t.Fatal(err)
		}
		cmd := exec.Command(bin, "analyze", path, "--format", "json")
		cmd.Stdout, cmd.Stderr = nil, os.Stderr
		if err := cmd.Run(); err != nil {
			t.Fatalf("%d minutes: %v", minutes, err)
		}
		ru := cmd.ProcessState.SysUsage().(*syscall.Rusage)
		return float64(ru.Maxrss) / 1024, cmd.ProcessState.UserTime() + cmd.ProcessState.SystemTime()
	}
	rss15, cpu15 := run(15)
	rss60, cpu60 := run(60)
	t.Logf("15 min: %.0f MB, %v CPU; 60 min: %.0f MB, %v CPU", rss15, cpu15, rss60, cpu60)
	if rss60 > 150 {
		t.Errorf("60 minutes at 1 kHz peak at %.0f MB resident, above 150 MB", rss60)
	}
	if r := float64(cpu60) / float64(cpu15); r > 6 {
		t.Errorf("60 minutes take %.1f times the CPU of 15 (%v, %v): not linear", r, cpu60, cpu15)
	}
}
