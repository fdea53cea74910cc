package main

import (
	"github.com/spf13/cobra"

	"socmap/output"
)

func newInspectCmd() *cobra.Command {
	return &cobra.Command{
		Use:   "inspect FILE",
		Short: "summary of a result file: groups, datasets with shapes, units and key attributes",
		Example: `  socmap inspect socmap-demo/shake.h5
  socmap inspect --json socmap-demo/map-rabi-phase.h5`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			t, err := output.Inspect(args[0])
			if err != nil {
				return err
			}
			if g.json {
				return writeJSON(cmd.OutOrStdout(), t)
			}
			return t.WriteText(cmd.OutOrStdout())
		},
	}
}
