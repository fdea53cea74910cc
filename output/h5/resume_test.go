package h5

import (
	"bufio"
	"fmt"
	"math"
	"math/rand"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"syscall"
	"testing"
)

const (
	resumeEnv      = "SOCMAP_H5_RESUME_CHILD"
	resumeNY       = 20
	resumeNX       = 50
	resumeNPoints  = resumeNY * resumeNX
	resumeKillLine = 150
)

func resumeEnergy(k int) float64 { return 0.5*float64(k) + 1 }
func resumePsi(k int) complex128 { return complex(float64(k), -float64(k)) }

// layoutSweep lays out a map file the way a sweep does (package
// documentation, step 1).
func layoutSweep(t *testing.T, name string) {
	f := mustCreate(t, name)
	defer func() {
		if err := f.Close(); err != nil {
			t.Fatal(err)
		}
	}()
	shape := []int{resumeNY, resumeNX}
	if _, err := f.CreateDataset("/map/energy", Float64, shape, Meta{Units: "E_R", Description: "energy"}, &DatasetOptions{Fill: math.NaN()}); err != nil {
		t.Fatal(err)
	}
	if _, err := f.CreateDataset("/map/psi", Complex128, shape, meta, &DatasetOptions{Chunk: []int{5, 10}}); err != nil {
		t.Fatal(err)
	}
	if _, err := f.CreateDataset("/map/done", Int8, shape, meta, nil); err != nil {
		t.Fatal(err)
	}
}

// writePoint is the per-point protocol of the package documentation.
func writePoint(f *File, e, p, d *Dataset, k int) error {
	at, one := []int{k / resumeNX, k % resumeNX}, []int{1, 1}
	if err := e.WriteAt(at, one, []float64{resumeEnergy(k)}); err != nil {
		return err
	}
	if err := p.WriteAt(at, one, []complex128{resumePsi(k)}); err != nil {
		return err
	}
	if err := f.Flush(); err != nil {
		return err
	}
	if err := d.WriteAt(at, one, []int8{1}); err != nil {
		return err
	}
	return f.Flush()
}

func openSweep(name string) (f *File, e, p, d *Dataset, err error) {
	if f, err = OpenRW(name); err != nil {
		return
	}
	if e, err = f.OpenDataset("/map/energy"); err != nil {
		return
	}
	if p, err = f.OpenDataset("/map/psi"); err != nil {
		return
	}
	d, err = f.OpenDataset("/map/done")
	return
}

// TestResumeChild is the helper process of TestResumeAfterKill: it writes
// the points in a random order, forever, reporting each on stdout.
func TestResumeChild(t *testing.T) {
	name := os.Getenv(resumeEnv)
	if name == "" {
		t.Skip("helper process for TestResumeAfterKill")
	}
	f, e, p, d, err := openSweep(name)
	if err != nil {
		fmt.Println("error", err)
		os.Exit(3)
	}
	seed, _ := strconv.Atoi(os.Getenv(resumeEnv + "_SEED"))
	rng := rand.New(rand.NewSource(int64(seed)))
	for n := 0; ; n++ {
		k := rng.Intn(resumeNPoints)
		if err := writePoint(f, e, p, d, k); err != nil {
			fmt.Println("error", err)
			os.Exit(3)
		}
		fmt.Println(n)
	}
}

// checkSweep verifies that every point marked done holds its values and
// returns how many are done.
func checkSweep(t *testing.T, name string) int {
	t.Helper()
	f, err := Open(name)
	if err != nil {
		t.Fatalf("file unreadable after kill: %v", err)
	}
	defer f.Close()
	done, _, err := f.ReadInt8s("/map/done")
	if err != nil {
		t.Fatal(err)
	}
	en, _, err := f.ReadFloat64s("/map/energy")
	if err != nil {
		t.Fatal(err)
	}
	psi, _, err := f.ReadComplex128s("/map/psi")
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for k, dn := range done {
		switch dn {
		case 1:
			n++
			if en[k] != resumeEnergy(k) || psi[k] != resumePsi(k) {
				t.Fatalf("point %d marked done holds %v, %v", k, en[k], psi[k])
			}
		case 0:
			if !math.IsNaN(en[k]) && en[k] != resumeEnergy(k) {
				t.Fatalf("point %d not done holds %v", k, en[k])
			}
		default:
			t.Fatalf("done[%d] = %d", k, dn)
		}
	}
	return n
}

// TestResumeAfterKill kills (SIGKILL) a process writing a map point by point
// three times, checks after each kill that the file opens and that every
// point marked done holds its values, then resumes the remaining points.
func TestResumeAfterKill(t *testing.T) {
	name := filepath.Join(t.TempDir(), "sweep.h5")
	layoutSweep(t, name)
	for round := 0; round < 3; round++ {
		cmd := exec.Command(os.Args[0], "-test.run=^TestResumeChild$", "-test.count=1")
		cmd.Env = append(os.Environ(), resumeEnv+"="+name, fmt.Sprintf("%s_SEED=%d", resumeEnv, round))
		out, err := cmd.StdoutPipe()
		if err != nil {
			t.Fatal(err)
		}
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		sc := bufio.NewScanner(out)
		lines := 0
		for lines < resumeKillLine && sc.Scan() {
			if _, err := strconv.Atoi(sc.Text()); err != nil {
				t.Fatalf("child: %s", sc.Text())
			}
			lines++
		}
		cmd.Process.Signal(syscall.SIGKILL)
		go func() {
			for sc.Scan() {
			}
		}()
		cmd.Wait()
		if lines < resumeKillLine {
			t.Fatalf("child stopped after %d points", lines)
		}
		n := checkSweep(t, name)
		t.Logf("round %d: killed after ≥%d point writes; %d points done and correct", round, lines, n)
		if n == 0 {
			t.Fatal("no point done")
		}
	}
	// resume: write what is missing
	f, e, p, d, err := openSweep(name)
	if err != nil {
		t.Fatal(err)
	}
	done, _, err := f.ReadInt8s("/map/done")
	if err != nil {
		t.Fatal(err)
	}
	for k, dn := range done {
		if dn == 0 {
			if err := writePoint(f, e, p, d, k); err != nil {
				t.Fatal(err)
			}
		}
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	if n := checkSweep(t, name); n != resumeNPoints {
		t.Errorf("after resume %d of %d points done", n, resumeNPoints)
	}
}
