package assess

import (
	"bytes"
	"encoding/json"
	"fmt"

	"fringe/bench/outdir"
	"fringe/bench/runner"
	"fringe/results"
)

// assessManifest is assess.json: what the report was computed from. It
// holds nothing that varies between identical runs (no times, no host), so
// the whole output directory is byte-identical for the same options.
type assessManifest struct {
	Tool       string                  `json:"tool"`
	Version    string                  `json:"version"`
	Seed       uint64                  `json:"seed"`
	Repeats    int                     `json:"repeats"`
	Weights    string                  `json:"weights"`
	Ratio      float64                 `json:"p2_over_p1"`
	Confidence float64                 `json:"confidence"`
	Margin     float64                 `json:"equivalence_margin"`
	Subsets    []int                   `json:"subsets"`
	Classical  string                  `json:"classical_pipeline"`
	Datasets   []results.DatasetRecord `json:"datasets"`
	Warnings   []string                `json:"warnings"`
	// The device of -device (absent without one): its name and the
	// SHA-256 of its description, and the test instances simulated per
	// row and size.
	Device          string `json:"device,omitempty"`
	DeviceSHA       string `json:"device_sha256,omitempty"`
	DeviceInstances int    `json:"device_instances,omitempty"`
}

// Write writes the assessment into dir: assess.csv,
// assess-resources.csv, assess.md, assess.tex, assess.json and the figures
// (figures/assess-*.svg, .pdf, .png; see results.AssessFigures). The files
// are written into a temporary directory beside dir, which is renamed into
// place only when every file is complete; an existing dir is replaced only
// then. On error nothing is left behind. a.Figures is set to the figures
// written.
func Write(dir string, a *results.Assessment) error {
	figs, err := results.AssessFigures(a, outdir.SafeName)
	if err != nil {
		return fmt.Errorf("assess: figures: %w", err)
	}
	a.Figures = a.Figures[:0]
	for _, f := range figs {
		a.Figures = append(a.Figures, results.FigureRef{Path: f.Name, Caption: f.Caption})
	}
	man := assessManifest{
		Tool: "fringe assess", Version: runner.Version, Seed: a.Seed, Repeats: a.Repeats, Weights: a.Weights,
		Ratio: a.Ratio, Confidence: a.Confidence, Margin: a.Margin, Subsets: a.Subsets, Classical: a.ClassicalPipeline,
		Datasets: a.Datasets, Warnings: append([]string{}, a.Warnings...),
		Device: a.Device, DeviceSHA: a.DeviceSHA, DeviceInstances: a.DeviceInstances,
	}
	files := []outdir.File{
		{Name: "assess.csv", Render: func(b *bytes.Buffer) error { return results.WriteAssessCSV(b, a) }},
		{Name: "assess-resources.csv", Render: func(b *bytes.Buffer) error { return results.WriteAssessResourcesCSV(b, a) }},
		{Name: "assess.md", Render: func(b *bytes.Buffer) error { return results.WriteAssessMarkdown(b, a) }},
		{Name: "assess.tex", Render: func(b *bytes.Buffer) error { return results.WriteAssessTeX(b, a) }},
		{Name: "assess.json", Render: func(b *bytes.Buffer) error {
			enc := json.NewEncoder(b)
			enc.SetIndent("", "  ")
			return enc.Encode(man)
		}},
	}
	files = append(files, outdir.FigureFiles(figs)...)
	return outdir.Write(dir, files)
}
