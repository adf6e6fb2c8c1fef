package results

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"sort"
	"strings"
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
	SpecDir   string            `json:"spec_dir"` // absolute; relative data paths of the spec are resolved against it ("" for a built-in spec)
	SpecText  string            `json:"spec_text"`
	SpecSHA   string            `json:"spec_sha256"`
	Seed      uint64            `json:"seed"`
	Workers   int               `json:"workers"`
	Tasks     int               `json:"tasks"`
	Datasets  []DatasetRecord   `json:"datasets"`
	Devices   []DeviceRecord    `json:"devices,omitempty"` // the devices and calibration files of models that name them
	Start     string            `json:"start"`
	End       string            `json:"end"`
	Seconds   float64           `json:"seconds"`
	Host      string            `json:"host"`
	GOOS      string            `json:"goos"`
	GOARCH    string            `json:"goarch"`
	CPUs      int               `json:"cpus"`
	Warnings  []string          `json:"warnings"`

	// The seals of the run directory (see SealManifest): the SHA-256 of
	// DigestsFile (which lists every other file but the manifest and
	// timings.csv), of timings.csv, and of the manifest itself.
	DigestsSHA  string `json:"digests_sha256"`
	TimingsSHA  string `json:"timings_sha256"`
	ManifestSHA string `json:"manifest_sha256"`
}

// DigestsFile is the name of a run directory's digest list: one line
// "<sha256 hex>  <path>" per file (slash-separated, relative to the
// directory, sorted by path), the layout `sha256sum -c` reads. It lists
// every file but itself, manifest.json and timings.csv (which differ
// between identical runs and are sealed by the manifest instead), so it is
// byte-identical for the same spec and seed.
const DigestsFile = "digests.sha256"

// DigestList writes the digest list of files (name -> content).
func DigestList(files map[string][]byte) []byte {
	names := make([]string, 0, len(files))
	for n := range files {
		names = append(names, n)
	}
	sort.Strings(names)
	var b bytes.Buffer
	for _, n := range names {
		fmt.Fprintf(&b, "%s  %s\n", SHA256Hex(files[n]), n)
	}
	return b.Bytes()
}

// ParseDigestList reads a digest list: path -> hex digest, and the paths
// in file order. Malformed lines are an error naming the line.
func ParseDigestList(data []byte, file string) (map[string]string, []string, error) {
	out := map[string]string{}
	var order []string
	for i, line := range strings.Split(string(data), "\n") {
		if line == "" {
			continue
		}
		sum, path, ok := strings.Cut(line, "  ")
		if !ok || len(sum) != 64 || strings.Trim(sum, "0123456789abcdef") != "" || path == "" {
			return nil, nil, &ParseError{File: file, Line: i + 1, Err: fmt.Errorf("want \"<64 hex digits>  <path>\", got %q", line)}
		}
		if _, dup := out[path]; dup {
			return nil, nil, &ParseError{File: file, Line: i + 1, Err: fmt.Errorf("%s is listed twice", path)}
		}
		out[path] = sum
		order = append(order, path)
	}
	return out, order, nil
}

// SHA256Hex is the hex SHA-256 of data.
func SHA256Hex(data []byte) string {
	sum := sha256.Sum256(data)
	return hex.EncodeToString(sum[:])
}

// manifestSealPlaceholder stands in for the manifest's own digest while
// that digest is computed.
var manifestSealPlaceholder = strings.Repeat("0", 64)

// SealManifest encodes m as WriteManifest does, with ManifestSHA set to
// the SHA-256 of the encoding in which that field holds 64 zeros, so that
// any change of a byte of the file can be told (CheckManifestSeal). It is
// a checksum, not a signature: whoever can edit the file can recompute it.
func SealManifest(m *Manifest) ([]byte, error) {
	c := *m
	c.ManifestSHA = manifestSealPlaceholder
	var b bytes.Buffer
	if err := WriteManifest(&b, &c); err != nil {
		return nil, err
	}
	data := b.Bytes()
	key := []byte(`"manifest_sha256": "` + manifestSealPlaceholder + `"`)
	at := bytes.LastIndex(data, key)
	if at < 0 {
		return nil, fmt.Errorf("results: manifest seal: the encoding lacks its digest field")
	}
	sum := SHA256Hex(data)
	copy(data[at+len(key)-65:], sum)
	return data, nil
}

// CheckManifestSeal reports whether manifest.json's bytes match the digest
// they carry (SealManifest). A manifest written before seals existed has
// none and fails.
func CheckManifestSeal(data []byte) bool {
	key := []byte(`"manifest_sha256": "`)
	at := bytes.LastIndex(data, key)
	if at < 0 || len(data) < at+len(key)+65 || data[at+len(key)+64] != '"' {
		return false
	}
	start := at + len(key)
	got := string(data[start : start+64])
	c := bytes.Clone(data)
	copy(c[start:], manifestSealPlaceholder)
	return SHA256Hex(c) == got
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

// DeviceRecord is the device and calibration of one model in the
// manifest: the device's name and description file ("" for an embedded
// device) with the SHA-256 of the description, and the calibration file
// with its SHA-256 (empty without one).
type DeviceRecord struct {
	Model             string `json:"model"`
	Device            string `json:"device,omitempty"`
	File              string `json:"file,omitempty"`
	SHA256            string `json:"sha256,omitempty"`
	Mitigate          string `json:"mitigate,omitempty"`
	Calibration       string `json:"calibration,omitempty"`
	CalibrationSHA256 string `json:"calibration_sha256,omitempty"`
}

// WriteManifest writes the manifest as indented JSON.
func WriteManifest(w io.Writer, m *Manifest) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(m)
}
