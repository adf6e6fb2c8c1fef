package modelkit

import (
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/qkernel"
)

// TestReadCalibration: a calibration file by measured bits gives each
// bit's confusion matrix as the observed frequencies (the
// maximum-likelihood estimate, qkernel.ConfusionFromCounts; values
// derived by hand from the counts below), columns in any order; Bits
// orders them as qkernel.Mitigation.Confusion wants (class bits, least
// significant first, then the ancilla) and refuses a dataset with more
// class bits than calibrated; a file by physical qubits fills Physical.
func TestReadCalibration(t *testing.T) {
	dir := t.TempDir()
	bits := filepath.Join(dir, "bits.csv")
	os.WriteFile(bits, []byte("prepared,qubit,read1,read0\n0,ancilla,20,980\n1,ancilla,970,30\n0,class[0],50,950\n1,class[0],900,100\n"), 0o644)
	cal, err := ReadCalibration(bits)
	if err != nil {
		t.Fatal(err)
	}
	near := func(a, b float64) bool { return scalar.EqualWithinAbs(a, b, 1e-15) } // ratios of small integers
	check := func(what string, c qkernel.Confusion, p01, p10 float64) {
		t.Helper()
		if !near(c[1][0], p01) || !near(c[0][1], p10) || !near(c[0][0], 1-p01) || !near(c[1][1], 1-p10) {
			t.Errorf("%s: %v, want p01 %v, p10 %v", what, c, p01, p10)
		}
	}
	check("ancilla", cal.Ancilla, 20.0/1000, 30.0/1000)
	if len(cal.Class) != 1 || cal.Physical != nil {
		t.Fatalf("%d class bits, physical %v", len(cal.Class), cal.Physical)
	}
	check("class[0]", cal.Class[0], 50.0/1000, 100.0/1000)
	conf, err := cal.Bits(2)
	if err != nil || len(conf) != 2 || conf[0] != cal.Class[0] || conf[1] != cal.Ancilla {
		t.Errorf("Bits(2) = %v, %v", conf, err)
	}
	if _, err := cal.Bits(3); err == nil {
		t.Error("3 classes (2 class bits) from a calibration of 1 class bit")
	}
	phys := filepath.Join(dir, "phys.csv")
	os.WriteFile(phys, []byte("qubit,prepared,read0,read1\n1,0,99,1\n0,0,98,2\n0,1,3,97\n1,1,4,96\n"), 0o644)
	pc, err := ReadCalibration(phys)
	if err != nil {
		t.Fatal(err)
	}
	if len(pc.Physical) != 2 {
		t.Fatalf("%d physical qubits", len(pc.Physical))
	}
	check("q0", pc.Physical[0], 0.02, 0.03)
	check("q1", pc.Physical[1], 0.01, 0.04)
	if c, err := pc.Bits(2); c != nil || err != nil {
		t.Errorf("Bits of a physical calibration: %v, %v", c, err)
	}
}
