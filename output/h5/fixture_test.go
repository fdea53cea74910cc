package h5

import (
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
)

// FixtureName is the file written by TestWriteFixture.
const fixtureName = "h5_fixture.h5"

// writeFixture writes the file that testdata/h5_check.py reads with h5py.
// Every value is exactly representable so that the Python side can compare
// bit for bit with values it recomputes from the same formulas.
func writeFixture(name string) error {
	f, err := Create(name, true)
	if err != nil {
		return err
	}
	defer f.Abort() // no-op after a successful Close
	err = f.SetAttrs("/",
		Attr{"program_version", "socmap h5 fixture"},
		Attr{"command_line", "go test -run TestWriteFixture ./output/h5"},
		Attr{"created_utc", "2026-01-01T00:00:00Z"},
		Attr{"plan", "# invented test plan\n[scheme]\nkind = \"shake\"\nomega = \"2π × 3 kHz\" # Ω\n"},
		Attr{"answer", int64(42)},
		Attr{"ratio", 2.5},
		Attr{"weights", []float64{1, 0.5, -3}},
		Attr{"counts", []int64{-1, 0, 1 << 40}},
	)
	if err != nil {
		return err
	}
	delta := make([]float64, 11)
	for i := range delta {
		delta[i] = 0.25*float64(i) - 1
	}
	if err := f.WriteFloat64s("/axes/delta", delta, nil, Meta{Units: "E_R", Description: "detuning axis"}); err != nil {
		return err
	}
	f3 := make([]float64, 3*4*5)
	for i := 0; i < 3; i++ {
		for j := 0; j < 4; j++ {
			for k := 0; k < 5; k++ {
				f3[(i*4+j)*5+k] = float64(i*100+j*10+k) + 0.5
			}
		}
	}
	if err := f.WriteFloat64s("/data/f64_3d", f3, []int{3, 4, 5}, Meta{Units: "m", Description: "3-D floats"}); err != nil {
		return err
	}
	if err := f.WriteInt8s("/data/i8", []int8{-3, -2, -1, 0, 1, 2}, []int{2, 3}, Meta{Units: "dimensionless", Description: "int8 values"}); err != nil {
		return err
	}
	if err := f.WriteInt32s("/data/i32", []int32{math.MinInt32, -1, 0, 1, math.MaxInt32, 123456}, nil, Meta{Units: "dimensionless", Description: "int32 values"}); err != nil {
		return err
	}
	psi := make([]complex128, 4*8)
	for i := 0; i < 4; i++ {
		for j := 0; j < 8; j++ {
			psi[i*8+j] = complex(0.5*float64(j), -0.25*float64(i))
		}
	}
	if err := f.WriteComplex128s("/data/psi", psi, []int{4, 8}, Meta{Units: "1/k_R", Description: "complex field"}); err != nil {
		return err
	}
	big := make([]float64, 256*300)
	for k := range big {
		big[k] = 0.125 * float64(k%1000)
	}
	if err := f.WriteFloat64s("/data/big", big, []int{256, 300}, Meta{Units: "Hz", Description: "large array, chunked and compressed"}); err != nil {
		return err
	}

	// hyperslab writes into chunked datasets
	const ny, nx = 30, 40
	e, err := f.CreateDataset("/map/energy", Float64, []int{ny, nx}, Meta{Units: "E_R", Description: "energy per particle"},
		&DatasetOptions{Chunk: []int{8, 16}, Compress: true, Fill: math.NaN()})
	if err != nil {
		return err
	}
	done, err := f.CreateDataset("/map/done", Int8, []int{ny, nx}, Meta{Units: "dimensionless", Description: "1 where the point is computed"}, &DatasetOptions{Chunk: []int{8, 8}})
	if err != nil {
		return err
	}
	for i := 0; i < ny; i++ {
		for j := 0; j < nx; j++ {
			if (i+j)%7 == 0 {
				if err := e.WriteAt([]int{i, j}, []int{1, 1}, []float64{float64(100*i + j)}); err != nil {
					return err
				}
				if err := done.WriteAt([]int{i, j}, []int{1, 1}, []int8{1}); err != nil {
					return err
				}
			}
		}
	}
	blk := make([]float64, 5*9)
	for a := 0; a < 5; a++ {
		for b := 0; b < 9; b++ {
			blk[a*9+b] = -float64(a*9+b) - 0.5
		}
	}
	if err := e.WriteAt([]int{6, 14}, []int{5, 9}, blk); err != nil {
		return err
	}
	mp, err := f.CreateDataset("/map/psi", Complex128, []int{ny, nx}, Meta{Units: "dimensionless", Description: "complex map"}, &DatasetOptions{Chunk: []int{8, 8}})
	if err != nil {
		return err
	}
	pb := make([]complex128, 2*3)
	for a := 0; a < 2; a++ {
		for b := 0; b < 3; b++ {
			pb[a*3+b] = complex(float64(a), float64(b))
		}
	}
	if err := mp.WriteAt([]int{2, 3}, []int{2, 3}, pb); err != nil {
		return err
	}
	phase := make([]int8, ny*nx)
	for k := range phase {
		phase[k] = int8(k % 5)
	}
	if err := f.WriteInt8s("/map/phase", phase, []int{ny, nx}, Meta{Units: "dimensionless", Description: "phase code",
		Attrs: []Attr{{"codes", "0=not-computed 1=single-minimum 2=plane-wave 3=stripe 4=not-converged"}}}); err != nil {
		return err
	}
	return f.Close()
}

// TestWriteFixture writes the fixture for the outside readers into
// $SOCMAP_H5_FIXTURE_DIR (or a temporary directory), then checks it with
// h5dump -H (Debian hdf5-tools) and testdata/h5_check.py (Debian h5py)
// when these are installed.
func TestWriteFixture(t *testing.T) {
	dir := os.Getenv("SOCMAP_H5_FIXTURE_DIR")
	if dir == "" {
		dir = t.TempDir()
	}
	name := filepath.Join(dir, fixtureName)
	if err := writeFixture(name); err != nil {
		t.Fatal(err)
	}
	if h5dump, err := exec.LookPath("h5dump"); err == nil {
		if out, err := exec.Command(h5dump, "-H", name).CombinedOutput(); err != nil {
			t.Errorf("h5dump -H %s: %v\n%s", name, err, out)
		}
	} else {
		t.Log("h5dump not installed: skipped")
	}
	const py = "/usr/bin/python3"
	script := filepath.Join("..", "..", "testdata", "h5_check.py")
	if _, err := os.Stat(py); err != nil {
		t.Logf("%s not installed: skipped h5py check", py)
		return
	}
	if err := exec.Command(py, "-c", "import h5py").Run(); err != nil {
		t.Logf("h5py not importable: skipped h5py check")
		return
	}
	out, err := exec.Command(py, script, name).CombinedOutput()
	if err != nil {
		t.Errorf("%s %s: %v\n%s", script, name, err, out)
	} else {
		t.Logf("h5py check:\n%s", out)
	}
}
