package output

import (
	"encoding/json"
	"errors"
	"io/fs"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"syscall"
	"testing"

	"socmap/output/h5"
)

const testPlan = "# invented plan\n[scheme]\nkind = \"shake\"\n"

func writeInspectFixture(t *testing.T, name string) {
	t.Helper()
	f, err := h5.Create(name, false)
	if err != nil {
		t.Fatal(err)
	}
	big := make([]float64, 40)
	must := func(err error) {
		t.Helper()
		if err != nil {
			f.Abort()
			t.Fatal(err)
		}
	}
	must(f.SetAttrs("/", h5.Attr{Name: "plan_toml", Value: testPlan}, h5.Attr{Name: "version", Value: "test"},
		h5.Attr{Name: "big", Value: big}))
	must(f.WriteFloat64s("/axes/delta", []float64{-1, 0, 1}, nil, h5.Meta{Units: "E_R", Description: "detuning axis"}))
	must(f.WriteComplex128s("/state/psi", make([]complex128, 6), []int{2, 3}, h5.Meta{Units: "1/k_R", Description: "spinor",
		Attrs: []h5.Attr{{Name: "nan", Value: math.NaN()}, {Name: "big", Value: big}, {Name: "n", Value: 3},
			{Name: "long", Value: strings.Repeat("x", 300)}, {Name: "w", Value: []float64{1, math.Inf(-1)}}}}))
	d, err := f.CreateDataset("/map/energy", h5.Float64, []int{4, 5}, h5.Meta{Units: "E_R", Description: "energy"},
		&h5.DatasetOptions{Chunk: []int{2, 5}, Compress: true})
	must(err)
	must(d.WriteAt([]int{1, 1}, []int{1, 1}, []float64{2}))
	must(f.WriteFloat64s("/s", []float64{1}, []int{}, h5.Meta{Units: "Hz", Description: "scalar"}))
	must(f.CreateGroup("/empty"))
	must(f.Close())
}

func TestInspect(t *testing.T) {
	name := filepath.Join(t.TempDir(), "r.h5")
	writeInspectFixture(t, name)
	tr, err := Inspect(name)
	if err != nil {
		t.Fatal(err)
	}
	nodes := map[string]*Node{}
	var walk func(n *Node)
	walk = func(n *Node) {
		nodes[n.Path] = n
		for _, c := range n.Children {
			walk(c)
		}
	}
	walk(tr.Root)
	wantPaths := []string{"/", "/axes", "/axes/delta", "/empty", "/map", "/map/energy", "/s", "/state", "/state/psi"}
	var got []string
	for p := range nodes {
		got = append(got, p)
	}
	if len(got) != len(wantPaths) {
		t.Errorf("paths %v, want %v", got, wantPaths)
	}
	for _, p := range wantPaths {
		if nodes[p] == nil {
			t.Errorf("missing %s", p)
		}
	}
	psi := nodes["/state/psi"]
	if psi.Kind != "dataset" || psi.Type != "complex128" || !reflect.DeepEqual(psi.Shape, []int{2, 3}) ||
		psi.Units != "1/k_R" || psi.Description != "spinor" || psi.Storage != "contiguous" {
		t.Errorf("psi node %+v", psi)
	}
	attrs := map[string]AttrInfo{}
	for _, a := range psi.Attrs {
		attrs[a.Name] = a
	}
	if a := attrs["big"]; !a.Omitted || a.Size != 40 || a.Value != nil {
		t.Errorf("big attribute of a dataset: %+v", a)
	}
	if a := attrs["long"]; !a.Omitted || a.Size != 300 {
		t.Errorf("long string attribute: %+v", a)
	}
	if a := attrs["nan"]; a.Value != "NaN" {
		t.Errorf("NaN attribute: %+v", a)
	}
	if a := attrs["n"]; a.Value != int64(3) || a.Type != "int64" {
		t.Errorf("int attribute: %+v", a)
	}
	if _, ok := attrs["units"]; ok {
		t.Error("units repeated among attributes")
	}
	e := nodes["/map/energy"]
	if e.Storage != "chunked 2×5 shuffle+deflate" {
		t.Errorf("energy storage %q", e.Storage)
	}
	if s := nodes["/s"]; len(s.Shape) != 0 || s.Type != "float64" {
		t.Errorf("scalar node %+v", s)
	}
	root := map[string]AttrInfo{}
	for _, a := range tr.Root.Attrs {
		root[a.Name] = a
	}
	if a := root["plan_toml"]; a.Value != testPlan {
		t.Errorf("plan attribute %+v", a)
	}
	if a := root["big"]; a.Omitted || len(a.Value.([]any)) != 40 {
		t.Errorf("root attributes must be complete: %+v", a)
	}

	// JSON: encodes despite NaN/Inf, decodes back to the same structure
	js, err := json.Marshal(tr)
	if err != nil {
		t.Fatal(err)
	}
	var back Tree
	if err := json.Unmarshal(js, &back); err != nil || back.Root.Children[0].Path != "/axes" {
		t.Errorf("JSON round trip: %v", err)
	}
	if !strings.Contains(string(js), `"units":"E_R"`) || !strings.Contains(string(js), `"type":"complex128"`) {
		t.Errorf("JSON lacks units/type: %s", js)
	}

	text := tr.String()
	for _, want := range []string{
		name + "\n",
		"\n/\n",
		"  @plan_toml: |\n    # invented plan\n    [scheme]\n",
		"\n  axes/\n    delta  float64[3]  contiguous  [E_R]  detuning axis\n",
		"psi  complex128[2×3]  contiguous  [1/k_R]  spinor\n",
		"      @big: (float64[40], 40 elements, not shown)\n",
		"      @long: (string, 300 bytes, not shown)\n",
		"energy  float64[4×5]  chunked 2×5 shuffle+deflate  [E_R]  energy\n",
		"  s  float64[scalar]",
		"  empty/\n",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q:\n%s", want, text)
		}
	}
	t.Logf("\n%s", text)
}

func TestInspectBadFiles(t *testing.T) {
	dir := t.TempDir()
	good := filepath.Join(dir, "good.h5")
	writeInspectFixture(t, good)
	b, _ := os.ReadFile(good)
	trunc := filepath.Join(dir, "trunc.h5")
	os.WriteFile(trunc, b[:len(b)*2/3], 0o644)
	head := filepath.Join(dir, "head.h5")
	os.WriteFile(head, b[:100], 0o644)
	text := filepath.Join(dir, "plan.toml")
	os.WriteFile(text, []byte(testPlan), 0o644)

	// HDF5 must print nothing: watch file descriptor 2.
	capture, _ := os.CreateTemp(dir, "stderr")
	saved, _ := syscall.Dup(2)
	syscall.Dup3(int(capture.Fd()), 2, 0)
	var errs []error
	for _, p := range []string{trunc, head, text, dir, filepath.Join(dir, "missing.h5")} {
		_, err := Inspect(p)
		errs = append(errs, err)
	}
	syscall.Dup3(saved, 2, 0)
	syscall.Close(saved)
	if out, _ := os.ReadFile(capture.Name()); len(out) != 0 {
		t.Errorf("stderr output during Inspect:\n%s", out)
	}
	for i, p := range []string{trunc, head, text, dir, filepath.Join(dir, "missing.h5")} {
		err := errs[i]
		if err == nil {
			t.Errorf("%s: no error", p)
			continue
		}
		msg := err.Error()
		if !errors.Is(err, ErrBadFile) || !strings.Contains(msg, p) || strings.Contains(msg, "\n") {
			t.Errorf("%s: %q, want one line naming the file and matching ErrBadFile", p, msg)
		}
		t.Log(msg)
	}
	if !errors.Is(errs[0], h5.ErrFormat) || !errors.Is(errs[2], h5.ErrFormat) || !errors.Is(errs[4], fs.ErrNotExist) {
		t.Errorf("causes not kept: %v / %v / %v", errs[0], errs[2], errs[4])
	}
}

// foreignScript writes, with h5py (Debian python3-h5py), types socmap never
// writes itself: fixed-length and array string attributes, float32, uint16,
// bool (an HDF5 enum), complex64, a non-complex compound, a string dataset,
// soft and external links.
const foreignScript = `
import sys, h5py, numpy as np
with h5py.File(sys.argv[1], "w") as f:
    f.attrs["fixed"] = np.bytes_("fixed-length")
    f.attrs["names"] = np.array([b"ab", b"cd"], dtype="S2")
    f.attrs["vnames"] = ["x", "yy"]
    f.attrs["f32"] = np.float32(1.5)
    f.attrs["u8s"] = np.arange(3, dtype=np.uint8)
    f["a/f32"] = np.arange(6, dtype=np.float32).reshape(2, 3)
    f["a/u16"] = np.arange(4, dtype=np.uint16)
    f["a/b"] = np.array([True, False])
    f["a/c64"] = np.array([1 + 2j], dtype=np.complex64)
    f["a/rec"] = np.zeros(2, dtype=[("x", "f8"), ("n", "i4")])
    f["a/txt"] = "hello"
    f["a/f32"].attrs["units"] = np.bytes_("m")
    f["soft"] = h5py.SoftLink("/a/f32")
    f["dangling"] = h5py.SoftLink("/nowhere")
    f["ext"] = h5py.ExternalLink("other.h5", "/x")
`

func TestInspectForeignFile(t *testing.T) {
	const py = "/usr/bin/python3"
	if err := exec.Command(py, "-c", "import h5py").Run(); err != nil {
		t.Skip("h5py not available:", err)
	}
	name := filepath.Join(t.TempDir(), "foreign.h5")
	if out, err := exec.Command(py, "-c", foreignScript, name).CombinedOutput(); err != nil {
		t.Fatalf("h5py: %v\n%s", err, out)
	}
	tr, err := Inspect(name)
	if err != nil {
		t.Fatal(err)
	}
	text := tr.String()
	for _, want := range []string{
		`@fixed: "fixed-length"`, `@names: ["ab", "cd"]`, `@vnames: ["x", "yy"]`, "@f32: 1.5", "@u8s: [0 1 2]",
		"f32  float32[2×3]  contiguous  [m]", "u16  uint16[4]", "b  enum[2]", "c64  complex64[1]",
		"rec  compound{x,n}[2]", "txt  string[scalar]", "soft  (link or named type)", "ext  (link or named type)",
		"dangling  (link or named type)",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q", want)
		}
	}
	if _, err := json.Marshal(tr); err != nil {
		t.Error(err)
	}
	t.Logf("\n%s", text)
	// the h5 layer reads the foreign numeric types where lossless
	f, err := h5.Open(name)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if v, _, err := f.ReadFloat64s("/a/f32"); err != nil || v[5] != 5 {
		t.Errorf("float32 as float64: %v %v", v, err)
	}
	if v, _, err := f.ReadInt32s("/a/u16"); err != nil || v[3] != 3 {
		t.Errorf("uint16 as int32: %v %v", v, err)
	}
	if v, _, err := f.ReadComplex128s("/a/c64"); err != nil || v[0] != 1+2i {
		t.Errorf("complex64 as complex128: %v %v", v, err)
	}
}
