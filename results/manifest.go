package results

import (
	"encoding/json"
	"io"
)

// Manifest records what a run was: its spec, seed, software versions,
// dataset checksums and provenance, and when and where it ran. It is the
// only output file (with timings.csv) that differs between identical runs.
type Manifest struct {
	Tool      string            `json:"tool"`
	Version   string            `json:"version"`
	GoVersion string            `json:"go_version"`
	Modules   map[string]string `json:"modules"`
	Command   []string          `json:"command"`
	SpecName  string            `json:"spec_name"`
	SpecFile  string            `json:"spec_file"`
	SpecText  string            `json:"spec_text"`
	SpecSHA   string            `json:"spec_sha256"`
	Seed      uint64            `json:"seed"`
	Workers   int               `json:"workers"`
	Tasks     int               `json:"tasks"`
	Datasets  []DatasetRecord   `json:"datasets"`
	Start     string            `json:"start"`
	End       string            `json:"end"`
	Seconds   float64           `json:"seconds"`
	Host      string            `json:"host"`
	GOOS      string            `json:"goos"`
	GOARCH    string            `json:"goarch"`
	CPUs      int               `json:"cpus"`
	Warnings  []string          `json:"warnings"`
}

// DatasetRecord is a dataset's entry in the manifest.
type DatasetRecord struct {
	Name      string   `json:"name"`
	Source    string   `json:"source"`
	Title     string   `json:"title"`
	Origin    string   `json:"origin"`
	Citation  string   `json:"citation"`
	Licence   string   `json:"licence"`
	File      string   `json:"file"`
	SHA256    string   `json:"sha256"`
	Synthetic bool     `json:"synthetic"`
	Note      string   `json:"note,omitempty"`
	Rows      int      `json:"rows"`
	Features  []string `json:"features"`
	Classes   []string `json:"classes"`
	Counts    []int    `json:"class_counts"`
}

// WriteManifest writes the manifest as indented JSON.
func WriteManifest(w io.Writer, m *Manifest) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(m)
}
