package main

import (
	"fmt"
	"os"
	"sort"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// A plan file is TOML. Every key is the name of a command-line flag (without
// the dashes) and holds the same text the flag would take; tables only group
// keys for the reader and do not change their meaning:
//
//	[atom]
//	atom = "Na23"
//	up   = "1,0"
//	down = "1,1"
//	[shake]
//	bias     = "11.4 G"
//	gradient = "100 G/cm"
//
// A key that no socmap command knows is an error; a key that the running
// command does not use is ignored (one plan serves every command). Flags given
// on the command line override the plan.

// planTables are top-level tables that are not a group of flags but hold
// the settings of one command, which decodes them itself (e.g. [design]).
// Every command checks their keys with the given function and otherwise
// leaves them out of the flag settings.
var planTables = map[string]func(map[string]any) error{}

// planSettings flattens a decoded plan into key → text; an array is
// joined with commas in out and kept element by element in lists (for
// repeatable flags).
func planSettings(data map[string]any, prefix string, out map[string]string, lists map[string][]string) error {
	for k, v := range data {
		if check, ok := planTables[k]; ok && prefix == "" {
			t, isTable := v.(map[string]any)
			if !isTable {
				return fmt.Errorf("%q must be a table ([%s])", k, k)
			}
			if err := check(t); err != nil {
				return fmt.Errorf("[%s]: %v", k, err)
			}
			continue
		}
		switch t := v.(type) {
		case map[string]any:
			if err := planSettings(t, k, out, lists); err != nil {
				return err
			}
		case []any:
			parts := make([]string, len(t))
			for i, e := range t {
				parts[i] = fmt.Sprint(e)
			}
			out[k] = strings.Join(parts, ",")
			lists[k] = parts
		default:
			if _, dup := out[k]; dup {
				return fmt.Errorf("key %q appears twice", k)
			}
			out[k] = fmt.Sprint(v)
		}
	}
	return nil
}

// readPlanText decodes a plan. A leading UTF-8 byte-order mark (as some
// editors and spreadsheets write it) is dropped.
func readPlanText(text, name string) (map[string]string, map[string][]string, error) {
	text = strings.TrimPrefix(text, "\ufeff")
	var data map[string]any
	if _, err := toml.Decode(text, &data); err != nil {
		return nil, nil, usagef("--plan %s: not valid TOML: %v", name, strings.ReplaceAll(err.Error(), "\n", " "))
	}
	steps, err := takeSequenceSteps(data)
	if err != nil {
		return nil, nil, usagef("--plan %s: %v", name, err)
	}
	g.planSteps = steps
	out, lists := map[string]string{}, map[string][]string{}
	if err := planSettings(data, "", out, lists); err != nil {
		return nil, nil, usagef("--plan %s: %v", name, err)
	}
	return out, lists, nil
}

// applyPlan sets every flag of cmd that the plan names and the command line did not.
func applyPlan(cmd *cobra.Command) error {
	if g.plan == "" {
		return nil
	}
	b, err := os.ReadFile(g.plan)
	if err != nil {
		return usagef("--plan %q: cannot read: %v", g.plan, err)
	}
	return applyPlanText(cmd, string(b), g.plan)
}

func applyPlanText(cmd *cobra.Command, text, name string) error {
	g.planText = text
	settings, lists, err := readPlanText(text, name)
	if err != nil {
		return err
	}
	known := flagNames(cmd.Root(), nil)
	keys := make([]string, 0, len(settings))
	for k := range settings {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		if !known[k] || k == "plan" {
			return usagef("--plan %s: unknown key %q (keys are flag names, e.g. gradient, shake, atom)", name, k)
		}
		f := cmd.Flags().Lookup(k)
		if f == nil || f.Changed {
			continue
		}
		if err := setPlanFlag(cmd.Flags(), f, settings[k], lists[k]); err != nil {
			return usagef("--plan %s: %s = %q: %v", name, k, settings[k], err)
		}
		f.Changed = true
		if g.fromPlan == nil {
			g.fromPlan = map[string]bool{}
		}
		g.fromPlan[k] = true
	}
	return nil
}

// setPlanFlag sets a flag from a plan value: a repeatable flag takes a
// TOML array element by element, any other flag the text (an array joined
// with commas).
func setPlanFlag(fs *pflag.FlagSet, f *pflag.Flag, text string, list []string) error {
	if sv, ok := f.Value.(pflag.SliceValue); ok && list != nil {
		return sv.Replace(list)
	}
	return fs.Set(f.Name, text)
}

// effectivePlan renders the settings of cmd (every flag it has, with its value)
// as TOML, for result files: running the command with this plan repeats it.
func effectivePlan(cmd *cobra.Command) string {
	var b strings.Builder
	fmt.Fprintf(&b, "# socmap %s %s: effective settings\n", version, cmd.CommandPath())
	cmd.Flags().VisitAll(func(f *pflag.Flag) {
		switch f.Name {
		case "plan", "json", "quiet", "force", "help", "version", "out", "no-size-check":
			return // no-size-check: a replay on another machine checks again
		}
		if sv, ok := f.Value.(pflag.SliceValue); ok {
			// Lists as TOML arrays; an empty list is left out (its text
			// "[]" is not a value the flag takes back).
			if vals := sv.GetSlice(); len(vals) > 0 {
				q := make([]string, len(vals))
				for i, v := range vals {
					q[i] = strconv.Quote(v)
				}
				fmt.Fprintf(&b, "%s = [%s]\n", f.Name, strings.Join(q, ", "))
			}
			return
		}
		if f.Value.String() == "" {
			return
		}
		fmt.Fprintf(&b, "%s = %q\n", f.Name, f.Value.String())
	})
	return b.String()
}

// takeSequenceSteps removes the [[sequence.step]] array of tables from a
// decoded plan and returns its steps (only `socmap sequence` uses them;
// every other command ignores them). Keys of a step: name, duration, ramps
// (an array of "NAME=FROM:TO"), shape ("linear", "s"), release and
// interacting (booleans); any other key is an error. The rest of the
// [sequence] table is ordinary grouping of flag keys.
func takeSequenceSteps(data map[string]any) ([]planStep, error) {
	seq, ok := data["sequence"].(map[string]any)
	if !ok {
		return nil, nil
	}
	raw, ok := seq["step"]
	if !ok {
		return nil, nil
	}
	delete(seq, "step")
	list, ok := raw.([]map[string]any)
	if !ok {
		return nil, fmt.Errorf("sequence.step must be an array of tables ([[sequence.step]])")
	}
	var out []planStep
	for i, t := range list {
		var s planStep
		for k, v := range t {
			bad := func() error { return fmt.Errorf("sequence.step %d: %s = %v has the wrong type", i+1, k, v) }
			switch k {
			case "name", "duration", "shape":
				str, ok := v.(string)
				if !ok {
					return nil, bad()
				}
				switch k {
				case "name":
					s.Name = str
				case "duration":
					s.Duration = str
				default:
					s.Shape = str
				}
			case "ramps":
				arr, ok := v.([]any)
				if !ok {
					return nil, bad()
				}
				for _, e := range arr {
					str, ok := e.(string)
					if !ok {
						return nil, bad()
					}
					s.Ramps = append(s.Ramps, str)
				}
			case "release", "interacting":
				b, ok := v.(bool)
				if !ok {
					return nil, bad()
				}
				if k == "release" {
					s.Release = b
				} else {
					s.Interacting = b
				}
			default:
				return nil, fmt.Errorf("sequence.step %d: unknown key %q (allowed: name, duration, ramps, shape, release, interacting)", i+1, k)
			}
		}
		out = append(out, s)
	}
	return out, nil
}
