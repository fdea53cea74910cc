package main

import (
	"encoding/json"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"socmap/dispersion"
	"socmap/output"
)

// checkOuts validates --out paths before any work: allowed extensions, and
// (without --force) no existing file.
// outTypes lists the --out file types of a command that writes a figure:
// the figure types (output.FigureExts: .png, .svg, .pdf) and extra.
func outTypes(extra ...string) []string {
	return append(append([]string{}, output.FigureExts...), extra...)
}

func checkOuts(outs []string, exts ...string) error {
	if err := checkOutTypes(outs, exts...); err != nil {
		return err
	}
	seen := map[string]bool{}
	for _, o := range outs {
		abs, _ := filepath.Abs(o)
		if seen[abs] {
			return usagef("--out %q: given twice", o)
		}
		seen[abs] = true
		if err := probeWritable(filepath.Dir(o)); err != nil {
			return usagef("--out %q: cannot write in %q: %v", o, filepath.Dir(o), err)
		}
		if !g.force {
			if _, err := os.Stat(o); err == nil {
				return usagef("--out %q: file exists (use --force to overwrite)", o)
			}
		}
		dir := filepath.Dir(o)
		if st, err := os.Stat(dir); err != nil || !st.IsDir() {
			return usagef("--out %q: directory %q does not exist", o, dir)
		}
	}
	return nil
}

// probeWritable checks that a file can be created in dir (and removes it).
func probeWritable(dir string) error {
	f, err := os.CreateTemp(dir, ".socmap-probe-*")
	if err != nil {
		if pe, ok := err.(*os.PathError); ok {
			return pe.Err
		}
		return err
	}
	name := f.Name()
	f.Close()
	return os.Remove(name)
}

// runInfo describes this run for result files.
func runInfo(cmd *cobra.Command, kind string) output.RunInfo {
	plan := effectivePlan(cmd)
	if g.planText != "" {
		// The plan file as read, commented out: the effective settings above
		// already hold its values, and the stored plan stays a valid plan.
		plan += "\n# plan file " + g.plan + " as read:\n# " + strings.ReplaceAll(strings.TrimRight(g.planText, "\n"), "\n", "\n# ") + "\n"
	}
	return output.RunInfo{Version: version, CommandLine: strings.Join(os.Args, " "), Plan: plan, Kind: kind}
}

// writeResult writes doc as JSON, or the HDF5 result through fill, to path
// (by its extension). Files appear only when complete.
func writeResult(cmd *cobra.Command, path, kind string, doc map[string]any, fill func(w *output.Writer)) error {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".json":
		return output.WriteFileAtomic(path, g.force, func(w io.Writer) error {
			enc := json.NewEncoder(w)
			enc.SetIndent("", "  ")
			return enc.Encode(doc)
		})
	case ".h5":
		return output.CreateH5(path, g.force, runInfo(cmd, kind), fill)
	}
	return usagef("--out %q: unknown file type", path)
}

func shakeH5(p dispersion.Shake, r dispersion.ShakeResult) func(w *output.Writer) {
	return func(w *output.Writer) { w.WriteShake(p, r) }
}

func ramanH5(p dispersion.Raman, r dispersion.RamanResult) func(w *output.Writer) {
	return func(w *output.Writer) { w.WriteRaman(p, r) }
}

// emit writes the result files of a command (--out, by extension: .json or
// .h5 through fill), then prints doc as JSON (--json) or the table.
func emit(cmd *cobra.Command, outs []string, kind string, doc map[string]any, fill func(w *output.Writer), table *output.Table) error {
	for _, o := range outs {
		if err := writeResult(cmd, o, kind, doc, fill); err != nil {
			return err
		}
	}
	if g.json {
		return writeJSON(cmd.OutOrStdout(), doc)
	}
	return table.Write(cmd.OutOrStdout())
}
