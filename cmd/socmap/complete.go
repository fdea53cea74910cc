package main

import (
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/phases"
)

// Tab completion of flag values and arguments (cobra's completion
// functions; `socmap completion bash|zsh|fish` prints the shell script).
// The value lists come from the libraries wherever they keep one (atoms,
// map axes, verify axes), so that a new atom or axis completes without an
// edit here.

// fixed completes one of the given words.
func fixed(words ...string) cobra.CompletionFunc {
	return func(cmd *cobra.Command, args []string, toComplete string) ([]string, cobra.ShellCompDirective) {
		return words, cobra.ShellCompDirectiveNoFileComp
	}
}

// files completes file names with the given extensions (and folders).
func files(exts ...string) cobra.CompletionFunc {
	return func(cmd *cobra.Command, args []string, toComplete string) ([]string, cobra.ShellCompDirective) {
		return exts, cobra.ShellCompDirectiveFilterFileExt
	}
}

// axisSpecs completes "NAME=" for an axis flag; the range is typed by hand.
func axisSpecs(names []string) cobra.CompletionFunc {
	return func(cmd *cobra.Command, args []string, toComplete string) ([]string, cobra.ShellCompDirective) {
		out := make([]string, 0, len(names))
		for _, n := range names {
			out = append(out, n+"=")
		}
		return out, cobra.ShellCompDirectiveNoSpace | cobra.ShellCompDirectiveNoFileComp
	}
}

// sublevels completes "F,mF" of the chosen atom's ground manifold (both F
// of every atom when --atom is not given yet).
func sublevels(cmd *cobra.Command, args []string, toComplete string) ([]string, cobra.ShellCompDirective) {
	names := dispersion.SpeciesNames()
	if f := cmd.Flags().Lookup("atom"); f != nil && f.Value.String() != "" {
		names = []string{f.Value.String()}
	}
	seen := map[string]bool{}
	var out []string
	for _, n := range names {
		sp, err := dispersion.LookupSpecies(n)
		if err != nil {
			continue
		}
		for F := int(sp.I - 0.5); F <= int(sp.I+0.5); F++ {
			for m := -F; m <= F; m++ {
				s := fmt.Sprintf("%d,%d", F, m)
				if !seen[s] {
					seen[s] = true
					out = append(out, s)
				}
			}
		}
	}
	return out, cobra.ShellCompDirectiveNoFileComp
}

// completionOuts are the --out file types per command (for completion),
// without the dot; figure commands take outTypes' figure types too.
func completionOuts() map[string][]string {
	figs := func(extra ...string) []string {
		var out []string
		for _, e := range outTypes(extra...) {
			out = append(out, strings.TrimPrefix(e, "."))
		}
		return out
	}
	return map[string][]string{
		"scheme shake": {"h5", "json"}, "scheme raman": {"h5", "json"},
		"bands": figs(".csv", ".h5", ".json"), "ground": figs(".h5", ".json"),
		"map": figs(".h5", ".json"), "merge": figs(".h5", ".json"),
		"compare": {"json", "txt"}, "verify": figs(".h5", ".json"), "calibrate": figs(".h5", ".json"),
		"excitations": figs(".h5", ".json", ".csv"), "sequence": {"h5", "png", "gif", "json"},
		"design": {"h5", "png", "json"},
	}
}

// registerCompletions adds the completion functions to every command of
// root that has the flag.
func registerCompletions(root *cobra.Command) {
	verifyAxes := []string{gpe.VerifyPulseWidth.Name(), gpe.VerifyShakeFreq.Name()}
	outs := completionOuts()
	byFlag := map[string]cobra.CompletionFunc{
		"atom":     fixed(dispersion.SpeciesNames()...),
		"scheme":   fixed("shake", "raman", "direct"),
		"pulse":    fixed("delta", "rect", "gauss", "continuous"),
		"waveform": fixed("sine", "square"),
		"up":       sublevels,
		"down":     sublevels,
		"plan":     files("toml"),
		"data":     files("csv"),
		"png":      files("png"),
	}
	var walk func(c *cobra.Command)
	walk = func(c *cobra.Command) {
		path := strings.TrimPrefix(c.CommandPath(), root.Name()+" ")
		reg := func(flag string, f cobra.CompletionFunc) {
			if c.Flags().Lookup(flag) != nil || c.PersistentFlags().Lookup(flag) != nil {
				_ = c.RegisterFlagCompletionFunc(flag, f) // a flag registered twice keeps the first
			}
		}
		if c == root {
			reg("plan", byFlag["plan"])
		}
		for flag, f := range byFlag {
			if flag != "plan" && c.LocalNonPersistentFlags().Lookup(flag) != nil {
				reg(flag, f)
			}
		}
		if exts, ok := outs[path]; ok {
			reg("out", files(exts...))
		}
		switch path {
		case "map":
			reg("x", axisSpecs(phases.AxisNames()))
			reg("y", axisSpecs(phases.AxisNames()))
			reg("method", fixed("variational", "gpe"))
		case "verify":
			reg("x", axisSpecs(verifyAxes))
			reg("method", fixed("auto", "delta", "realtime"))
		case "inspect", "merge":
			c.ValidArgsFunction = func(cmd *cobra.Command, args []string, toComplete string) ([]string, cobra.ShellCompDirective) {
				return []string{"h5"}, cobra.ShellCompDirectiveFilterFileExt
			}
		}
		for _, s := range c.Commands() {
			walk(s)
		}
	}
	walk(root)
}
