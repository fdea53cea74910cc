// Command socmap computes the effective parameters of synthetic spin–orbit
// coupling schemes for two-component Bose–Einstein condensates, their bands,
// mean-field phases and Gross–Pitaevskii ground states. The commands are thin:
// all physics lives in the packages dispersion, phases and gpe.
package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"socmap/dispersion"
	"socmap/output"
)

// version is the program version, stored in every result file.
var version = "0.1.0"

// usageError is bad input: printed as one line, exit status 2.
type usageError struct{ msg string }

func (e usageError) Error() string { return e.msg }

func usagef(format string, a ...any) error { return usageError{fmt.Sprintf(format, a...)} }

// globals are the persistent flags shared by every command.
type globals struct {
	json, quiet, force bool
	noSizeCheck        bool // --no-size-check (estimate.go)
	plan               string
	planText           string          // the plan file as read, for result files
	fromPlan           map[string]bool // flags whose value came from the plan file
	planSteps          []planStep      // [[sequence.step]] tables of the plan file (sequence.go)
}

var g globals

func newRoot() *cobra.Command {
	root := &cobra.Command{
		Use:   "socmap",
		Short: "Synthetic spin–orbit coupling in two-component BECs: schemes, bands, phases, ground states",
		Long: `socmap takes the settings of a spin–orbit-coupling scheme (magnetic-gradient
shaking with phase-locked RF pulses, or two-beam Raman) to the effective model
(recoil, coupling, detuning), its bands, the mean-field phase and GPE ground
states. Quantities take units as text: "40 G/cm", "3 kHz", "90 deg", "790 nm".`,
		Version:       version,
		SilenceUsage:  true,
		SilenceErrors: true,
		PersistentPreRunE: func(cmd *cobra.Command, args []string) error {
			if err := applyPlan(cmd); err != nil {
				return err
			}
			return checkEmptyOuts(cmd)
		},
	}
	pf := root.PersistentFlags()
	pf.BoolVar(&g.json, "json", false, "print one JSON document (SI values, unit in the key name) instead of a table")
	pf.StringVar(&g.plan, "plan", "", "plan file (TOML) holding the same settings as the flags; flags override it")
	pf.BoolVar(&g.quiet, "quiet", false, "no progress output on stderr")
	pf.BoolVar(&g.force, "force", false, "overwrite existing output files")
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error { return usageError{err.Error()} })
	root.AddCommand(newSchemeCmd(), newBandsCmd(), newGroundCmd(), newMapCmd(), newCompareCmd(), newVerifyCmd(), newCalibrateCmd(), newDesignCmd(), newMergeCmd(), newInspectCmd(), newDemoCmd(), newExcitationsCmd(), newSequenceCmd())
	registerCompletions(root) // complete.go
	return root
}

func main() { os.Exit(run(os.Args[1:], os.Stdout, os.Stderr)) }

// run executes one command line and returns the exit status: 0 on success,
// 2 for bad input (one line on stderr naming the flag, the value and what is
// allowed), 1 for any other failure.
func run(args []string, stdout, stderr io.Writer) (code int) {
	// A panic of the command's goroutine (a bug) is reported as one line
	// instead of the runtime's stack dump; SOCMAP_TRACEBACK=1 keeps the
	// dump for debugging. (The runtime's fatal errors, such as running out
	// of memory, cannot be caught: the up-front estimates refuse such runs.)
	if os.Getenv("SOCMAP_TRACEBACK") == "" {
		defer func() {
			if r := recover(); r != nil {
				fmt.Fprintf(stderr, "socmap: internal error: %v (a bug in socmap: please report it with the command line; SOCMAP_TRACEBACK=1 shows where it happened)\n", strings.ReplaceAll(fmt.Sprint(r), "\n", " "))
				code = 1
			}
		}()
	}
	g = globals{}
	root := newRoot()
	root.SetArgs(args)
	root.SetOut(stdout)
	root.SetErr(stderr)
	err := root.Execute()
	if err == nil {
		return 0
	}
	msg := strings.ReplaceAll(err.Error(), "\n", " ")
	fmt.Fprintln(stderr, "socmap: "+msg)
	if isUsage(err) {
		return 2
	}
	return 1
}

func isUsage(err error) bool {
	var ue usageError
	if errors.As(err, &ue) || errors.Is(err, dispersion.ErrBadInput) || errors.Is(err, output.ErrExist) || errors.Is(err, output.ErrBadFile) {
		return true
	}
	s := err.Error()
	return strings.HasPrefix(s, "unknown command") || strings.HasPrefix(s, "unknown flag") ||
		strings.HasPrefix(s, "unknown shorthand") || strings.Contains(s, "accepts ") || strings.HasPrefix(s, "invalid argument")
}

// flagNames returns every flag name any command defines (for plan validation).
func flagNames(c *cobra.Command, acc map[string]bool) map[string]bool {
	if acc == nil {
		acc = map[string]bool{}
	}
	c.Flags().VisitAll(func(f *pflag.Flag) { acc[f.Name] = true })
	c.PersistentFlags().VisitAll(func(f *pflag.Flag) { acc[f.Name] = true })
	for _, s := range c.Commands() {
		flagNames(s, acc)
	}
	return acc
}
