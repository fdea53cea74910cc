package output

import (
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func temps(t *testing.T, dir string) []string {
	t.Helper()
	m, err := filepath.Glob(filepath.Join(dir, ".*.tmp"))
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func TestWriteFileAtomic(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "out.txt")
	err := WriteFileAtomic(path, false, func(w io.Writer) error {
		if _, err := os.Stat(path); !errors.Is(err, fs.ErrNotExist) {
			t.Errorf("final file visible while writing: %v", err)
		}
		if n := len(temps(t, dir)); n != 1 {
			t.Errorf("%d temporary files while writing", n)
		}
		_, err := io.WriteString(w, "hello\n")
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	if b, err := os.ReadFile(path); err != nil || string(b) != "hello\n" {
		t.Fatalf("content %q, %v", b, err)
	}
	if st, _ := os.Stat(path); st.Mode().Perm() != 0o644 {
		t.Errorf("mode %v", st.Mode())
	}
	if n := len(temps(t, dir)); n != 0 {
		t.Errorf("%d temporary files left", n)
	}

	// refuse to overwrite
	err = WriteFileAtomic(path, false, func(w io.Writer) error {
		t.Error("write called although the file exists")
		return nil
	})
	if !errors.Is(err, ErrExist) || !errors.Is(err, fs.ErrExist) || !strings.Contains(err.Error(), path) {
		t.Errorf("existing file: %v", err)
	}
	// a file appearing meanwhile is not replaced
	other := filepath.Join(dir, "race.txt")
	err = WriteFileAtomic(other, false, func(w io.Writer) error {
		return os.WriteFile(other, []byte("theirs"), 0o644)
	})
	if !errors.Is(err, ErrExist) {
		t.Errorf("file created meanwhile: %v", err)
	}
	if b, _ := os.ReadFile(other); string(b) != "theirs" {
		t.Errorf("file created meanwhile replaced: %q", b)
	}
	// force replaces
	if err := WriteFileAtomic(path, true, func(w io.Writer) error {
		_, err := io.WriteString(w, "new")
		return err
	}); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(path); string(b) != "new" {
		t.Errorf("forced content %q", b)
	}
	// a failing writer leaves nothing
	failed := filepath.Join(dir, "failed.txt")
	boom := errors.New("boom")
	err = WriteFileAtomic(failed, false, func(w io.Writer) error {
		io.WriteString(w, "partial")
		return boom
	})
	if !errors.Is(err, boom) || !strings.Contains(err.Error(), failed) {
		t.Errorf("failing writer: %v", err)
	}
	if _, err := os.Stat(failed); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("failed file exists: %v", err)
	}
	// a panicking writer leaves nothing either
	func() {
		defer func() { recover() }()
		WriteFileAtomic(failed, false, func(w io.Writer) error { panic("writer panics") })
	}()
	if n := len(temps(t, dir)); n != 0 {
		t.Errorf("%d temporary files left after failures", n)
	}
}

func TestWriteFileAtomicUnwritable(t *testing.T) {
	cases := []string{filepath.Join(t.TempDir(), "missing", "out.txt")}
	if os.Geteuid() == 0 {
		cases = append(cases, "/sys/out.txt") // root ignores permission bits; sysfs refuses new files
	} else {
		ro := filepath.Join(t.TempDir(), "ro")
		os.Mkdir(ro, 0o555)
		cases = append(cases, filepath.Join(ro, "out.txt"))
	}
	for _, path := range cases {
		err := WriteFileAtomic(path, false, func(w io.Writer) error { return nil })
		if err == nil {
			t.Errorf("%s: written", path)
			continue
		}
		if msg := err.Error(); !strings.Contains(msg, path) || strings.Contains(msg, "\n") || strings.Count(msg, ".tmp") > 0 {
			t.Errorf("error %q: want one line naming %s", msg, path)
		}
		t.Log(err)
	}
}
