package main

import (
	"fmt"

	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"socmap/dispersion"
	"socmap/output"
)

func newBandsCmd() *cobra.Command {
	var mf modelFlags
	var lf levelFlags
	var outs []string
	var kmax *quantity
	var samples int
	c := &cobra.Command{
		Use:   "bands",
		Short: "single-particle bands of an effective model: minima, barrier, effective mass, spin texture",
		Long: `Single-particle dispersion E±(k) of h = (k − k_R σz)²/2m + (ħΩ/2)σx + (ħδ/2)σz,
from a scheme (--scheme shake|raman with its settings) or given directly
(--omega-er, --delta-er). Energies in E_R, momenta in k_R.

With --levels 3 the full F = 1 model: three branches of
h = Σ_m [(k − K_m)² + E_m]|m⟩⟨m| + (Ω/√2)F_x, their minima (up to three) with
⟨F_z⟩ and ⟨F_z²⟩, and the two-level answer of the pair beside them. The
shaking scheme gives K_m and E_m from each sublevel's own moment (pair: two
adjacent F = 1 sublevels); the Raman scheme and the direct model are
h = (k − 2F_z)² + δF_z + εF_z² + (Ω/√2)F_x with --epsilon-er.`,
		Example: `  socmap bands --omega-er 2 --delta-er 0 --out bands.png --out bands.csv
  socmap bands --scheme raman --atom Rb87 --wavelength "790 nm" --raman-rabi "10 kHz"
  socmap bands --levels 3 --omega-er 1 --delta-er 0 --epsilon-er 0.2 --json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := lf.check(); err != nil {
				return err
			}
			if lf.levels == 3 {
				if err := checkOuts(outs, outTypes(".csv", ".h5", ".json")...); err != nil {
					return err
				}
				if !(kmax.v > 0) {
					return usagef("--k-max %q: must be positive", kmax.text)
				}
				if samples < 3 || samples > 1000000 {
					return usagef("--samples %d: allowed 3 … 1000000", samples)
				}
				return runBands3(cmd, &mf, &lf, outs, kmax.v, samples)
			}
			mc, err := mf.build()
			if err != nil {
				return err
			}
			if err := checkOuts(outs, outTypes(".csv", ".h5", ".json")...); err != nil {
				return err
			}
			if !(kmax.v > 0) {
				return usagef("--k-max %q: must be positive", kmax.text)
			}
			if samples < 3 || samples > 1000000 {
				return usagef("--samples %d: allowed 3 … 1000000", samples)
			}
			b := dispersion.Bands{Omega: mc.Model.OmegaOverER, Delta: mc.Model.DeltaOverER}
			info, err := b.Analyze()
			if err != nil {
				return usagef("%v", err)
			}
			curve := b.Sample(-kmax.v, kmax.v, samples)
			doc := bandsJSON(mc, b, info)
			bp := output.BandsPlot{Title: fmt.Sprintf("Single-particle bands, Ω = %s E_R, δ = %s E_R", output.Num(b.Omega, 3), output.Num(b.Delta, 3)),
				Subtitle: modelSubtitle(mc), Bands: b, Curve: curve, Info: info}
			for _, o := range outs {
				var err error
				switch strings.ToLower(filepath.Ext(o)) {
				case ".png", ".svg", ".pdf":
					err = output.WriteFigure(o, g.force, bp)
				case ".csv":
					err = output.WriteFileAtomic(o, g.force, bp.WriteCSV)
				default:
					err = writeResult(cmd, o, "bands", doc, func(w *output.Writer) {
						w.WriteModel("/model", mc.Model)
						w.WriteBands(b, curve, info)
					})
				}
				if err != nil {
					return err
				}
			}
			if g.json {
				return writeJSON(cmd.OutOrStdout(), doc)
			}
			return bandsTable(mc, b, info).Write(cmd.OutOrStdout())
		},
	}
	mf.add(c.Flags())
	lf.add(c.Flags(), false)
	kmax = qflag(c.Flags(), "k-max", KindNumber, "2.5", "plot and sample k_x over [−k-max, k-max] (units of k_R)")
	c.Flags().IntVar(&samples, "samples", 501, "number of k points in the CSV/HDF5 curves and the plot")
	c.Flags().StringSliceVar(&outs, "out", nil, "write FILE.png, .svg or .pdf (plot), FILE.csv (curves), FILE.h5 or FILE.json (repeatable)")
	return c
}

func modelSubtitle(mc modelChoice) string {
	if mc.Model.ER == 0 {
		return "effective model given directly"
	}
	return fmt.Sprintf("%s scheme, %s: k_R = %s 1/µm, E_R/h = %s Hz", mc.Scheme, mc.Atom.Name,
		output.Num(mc.Model.KR*1e-6, 4), output.Num(mc.Model.ERHz(), 4))
}

func bandsJSON(mc modelChoice, b dispersion.Bands, info dispersion.BandInfo) map[string]any {
	doc := map[string]any{
		"scheme": mc.Scheme, "omega_over_ER": b.Omega, "delta_over_ER": b.Delta,
		"minima": minimaJSON(info), "barrier_over_ER": info.Barrier, "barrier_k_over_kR": info.BarrierK,
		"gap_over_ER": info.Gap,
	}
	if mc.Model.ER > 0 {
		doc["k_R_per_m"] = mc.Model.KR
		doc["E_R_hz"] = mc.Model.ERHz()
		doc["atom"] = mc.Atom.Name
	}
	return doc
}

func bandsTable(mc modelChoice, b dispersion.Bands, info dispersion.BandInfo) *output.Table {
	N := output.Num
	t := &output.Table{Title: fmt.Sprintf("Bands of h = (k − σz)² + (Ω/2)σx + (δ/2)σz  [E_R, k_R]:  Ω = %s, δ = %s", N(b.Omega, 4), N(b.Delta, 4))}
	if mc.Model.ER > 0 {
		t.Text("from the " + modelSubtitle(mc))
	}
	t.Section("Lower-band minima")
	for i, m := range info.Minima {
		t.RowNote(fmt.Sprintf("minimum %d: k", i+1), N(m.K, 5), "k_R", fmt.Sprintf("E = %s E_R, ⟨σz⟩ = %s, m*/m = %s", N(m.E, 5), N(m.SigmaZ, 4), N(m.MassRel, 4)))
	}
	if len(info.Minima) == 2 {
		t.RowNote("barrier between the minima", N(info.Barrier, 4), "E_R", fmt.Sprintf("(top at k = %s k_R)", N(info.BarrierK, 3)))
	} else {
		t.Row("one minimum", "", "")
	}
	t.Row("band gap at the global minimum", N(info.Gap, 4), "E_R")
	if mc.Model.ER > 0 {
		t.Section("In SI")
		for i, m := range info.Minima {
			t.Row(fmt.Sprintf("minimum %d: k", i+1), N(m.K*mc.Model.KR, 4), "1/m")
		}
		t.Row("barrier", N(info.Barrier*mc.Model.ERHz(), 4), "Hz (E/h)")
	}
	return t
}
