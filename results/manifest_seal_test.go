package results

import (
	"bytes"
	"errors"
	"strings"
	"testing"
)

// TestManifestSeal: a sealed manifest checks; changing any single byte of
// it (every position is tried) makes the check fail.
func TestManifestSeal(t *testing.T) {
	m := &Manifest{Tool: "fringe", Version: "x", SpecName: "s", SpecText: "name = \"s\"\n", Seed: 3,
		Warnings: []string{"w"}, DigestsSHA: strings.Repeat("a", 64), TimingsSHA: strings.Repeat("b", 64)}
	data, err := SealManifest(m)
	if err != nil {
		t.Fatal(err)
	}
	if !CheckManifestSeal(data) {
		t.Fatalf("a freshly sealed manifest does not check:\n%s", data)
	}
	got, err := ReadManifest(bytes.NewReader(data), "manifest.json")
	if err != nil || got.ManifestSHA == "" || got.ManifestSHA == manifestSealPlaceholder || got.Seed != 3 {
		t.Fatalf("read back %+v, %v", got, err)
	}
	for i := range data {
		c := bytes.Clone(data)
		c[i] ^= 0x01
		if CheckManifestSeal(c) {
			t.Fatalf("flipping a bit of byte %d (%q) is not noticed", i, data[i])
		}
	}
	if CheckManifestSeal([]byte(`{"tool": "fringe"}`)) {
		t.Error("a manifest without a seal checks")
	}
}

// TestDigestList: sorted, in sha256sum's layout, and read back; malformed
// lines are refused with their line.
func TestDigestList(t *testing.T) {
	files := map[string][]byte{"b.csv": []byte("2"), "a.csv": []byte(""), "figures/x.svg": []byte("<svg/>")}
	list := DigestList(files)
	// sha256("") is e3b0c442...b855 (FIPS 180-4 test vector of the empty message, common practice).
	if !strings.HasPrefix(string(list), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855  a.csv\n") {
		t.Fatalf("list:\n%s", list)
	}
	got, order, err := ParseDigestList(list, DigestsFile)
	if err != nil || strings.Join(order, " ") != "a.csv b.csv figures/x.svg" || got["b.csv"] != SHA256Hex([]byte("2")) {
		t.Fatalf("parsed %v %v %v", got, order, err)
	}
	for _, bad := range []string{"zz  a.csv\n", strings.Repeat("a", 64) + " a.csv\n", strings.Repeat("a", 64) + "  a\n" + strings.Repeat("b", 64) + "  a\n"} {
		_, _, err := ParseDigestList([]byte(bad), DigestsFile)
		var pe *ParseError
		if !errors.As(err, &pe) || pe.Line == 0 {
			t.Errorf("%q: err %v, want a located parse error", bad, err)
		}
	}
}
