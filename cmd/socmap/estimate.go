package main

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"socmap/output"
	"socmap/phases"
)

// addSizeCheckFlag registers --no-size-check on a command that estimates
// its needs up front (map, ground, and the commands that follow them).
func addSizeCheckFlag(fs *pflag.FlagSet) {
	fs.BoolVar(&g.noSizeCheck, "no-size-check", false, "run even when the up-front estimate exceeds the free memory (MemAvailable) or the free disk of the output's file system")
}

// checkEstimate refuses (exit 2, one line: the estimate and the limit) a
// computation whose estimate exceeds the machine's free memory or, when
// out is not empty, the free disk where out is written, unless
// --no-size-check; otherwise it prints the plan and the estimate on stderr
// (not with --quiet).
func checkEstimate(cmd *cobra.Command, e phases.Estimate, out string) error {
	if !g.noSizeCheck {
		if err := output.CheckEstimate(e, out); err != nil {
			if errors.Is(err, output.ErrTooLarge) {
				return usagef("%s refused: %v (--no-size-check to try anyway)", cmd.Name(), err)
			}
			return err
		}
	}
	if !g.quiet {
		est := e.String()
		if out == "" {
			est = strings.Replace(est, "disk ≈ "+phases.Bytes(e.DiskBytes), "no file", 1)
		}
		fmt.Fprintf(cmd.ErrOrStderr(), "%s: %s; estimate: %s\n", cmd.Name(), e.What, est)
	}
	return nil
}

// checkEmptyOuts refuses an --out given an empty name (`--out ""`, which a
// list flag would otherwise take as no output at all), for every command.
func checkEmptyOuts(cmd *cobra.Command) error {
	f := cmd.Flags().Lookup("out")
	if f == nil || !f.Changed {
		return nil
	}
	empty := false
	if sv, ok := f.Value.(pflag.SliceValue); ok {
		list := sv.GetSlice()
		empty = len(list) == 0
		for _, s := range list {
			empty = empty || s == ""
		}
	} else {
		empty = f.Value.String() == ""
	}
	if empty {
		return usagef(`--out "": give a file name (e.g. --out result.json)`)
	}
	return nil
}

// h5Out returns the .h5 file among outs ("" when there is none).
func h5Out(outs []string) string {
	for _, o := range outs {
		if strings.EqualFold(filepath.Ext(o), ".h5") {
			return o
		}
	}
	return ""
}

// isTerminal reports whether f is a terminal (a character device).
// New commands show progress with output.NewProgress, which decides this
// itself.
func isTerminal(f *os.File) bool {
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}
