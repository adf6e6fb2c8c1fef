package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestPaperExample runs examples/paper.toml (two-column tables chosen in
// its [report]) and checks what the paper sees: the labels and the
// author's captions and \label keys in summary.tex, the generated names
// in the CSV files, a two-column standalone document that `fringe
// verify` accepts, and, with pdflatex installed, a compile whose log
// scripts/check-latex.sh passes (no overfull box over 1 pt, no float
// too large). Skipped under -short.
func TestPaperExample(t *testing.T) {
	if testing.Short() {
		t.Skip("runs an example and pdflatex")
	}
	out := filepath.Join(t.TempDir(), "paper")
	if code, _, stderr := runCmd(t, "", "run", "../../../examples/paper.toml", "-out", out, "-quiet"); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	read := func(name string) string {
		b, err := os.ReadFile(filepath.Join(out, name))
		if err != nil {
			t.Fatal(err)
		}
		return string(b)
	}
	tex, csv := read("summary.tex"), read("summary.csv")
	for _, want := range []string{`\begin{table*}`, `\label{tab:ws-scores}`, `\label{tab:ws-modes}`, `\label{tab:ws-tests}`,
		"QC, exact", "QC, 512 shots", "Linear SVM", "5-NN", `\caption{Interference classifier, exact and with 512 shots, against two classical baselines. Mean`} {
		if !strings.Contains(tex, want) {
			t.Errorf("summary.tex lacks %q", want)
		}
	}
	if strings.Contains(tex, "interference-shots64-balanced") || strings.Contains(tex, "Friedman") {
		t.Errorf("summary.tex shows a model or table the [report] leaves out")
	}
	if !strings.Contains(csv, "interference-shots512-balanced") || strings.Contains(csv, "QC, 512 shots") {
		t.Errorf("summary.csv should keep generated model names, not labels")
	}
	if !strings.Contains(read("summary-standalone.tex"), `\documentclass[twocolumn]{article}`) {
		t.Errorf("summary-standalone.tex is not a two-column document")
	}
	if code, stdout, stderr := runCmd(t, "", "verify", out); code != 0 {
		t.Errorf("verify: exit %d: %s%s", code, stdout, stderr)
	}
	bash, err := exec.LookPath("bash")
	if err != nil {
		t.Skip("bash not installed")
	}
	if _, err := exec.LookPath("pdflatex"); err != nil {
		t.Skip("pdflatex not installed")
	}
	script := filepath.Join("..", "..", "..", "scripts", "check-latex.sh")
	msg, err := exec.Command(bash, script, filepath.Join(out, "summary-standalone.tex")).CombinedOutput()
	if err != nil || !strings.Contains(string(msg), "no overfull box over 1 pt, no float too large") {
		t.Errorf("check-latex.sh: %v\n%s", err, msg)
	}
}
