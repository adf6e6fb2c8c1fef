package results

import "strings"

// Width estimates for the LaTeX tables. Every table is set in \small of a
// 10 pt article: Computer Modern at 9 pt (text cmr9, math cmmi9 and cmsy9,
// scripts at 6 pt, bold cmbx9). Widths come from the fonts' TFM files
// (tftopl, TeX Live 2022) in em of the design size; kerns and ligatures
// are ignored (they mostly narrow a word, so the estimate errs wide), and
// Times-like journal fonts are narrower than Computer Modern, so a table
// that fits by this estimate fits there too. TestTeXWidthsAgainstPdflatex
// compares the estimates with the boxes pdflatex builds.

// texPt is the size of \small in a 10 pt article.
const texPt = 9.0

// texScriptPt is the size of first-level scripts at \small (cmr6).
const texScriptPt = 6.0

// texWidthASCII is the width in em of OT1 cmr9 at the positions of the
// printable ASCII characters 32–126 (cmr9.tfm; position 32 holds the
// interword space 0.34259 instead of the glyph there). Positions whose
// OT1 glyph differs from ASCII (" < > \ _ { | } ^ ~) are never used
// directly; texASCII gives the widths of their escapes.
var texWidthASCII = [95]float64{
	0.34259, 0.285492, 0.513885, 0.856476, 0.513885, 0.856476, 0.799377, 0.285492, 0.399689, 0.399689,
	0.513885, 0.799377, 0.285492, 0.34259, 0.285492, 0.513885, 0.513885, 0.513885, 0.513885, 0.513885,
	0.513885, 0.513885, 0.513885, 0.513885, 0.513885, 0.513885, 0.285492, 0.285492, 0.285492, 0.799377,
	0.485336, 0.485336, 0.799377, 0.770674, 0.727927, 0.742279, 0.785026, 0.699378, 0.670829, 0.806477,
	0.770674, 0.370985, 0.528083, 0.799223, 0.64228, 0.941969, 0.770674, 0.799377, 0.699378, 0.799377,
	0.756476, 0.570984, 0.742279, 0.770674, 0.770674, 1.05617, 0.770674, 0.770674, 0.628082, 0.285492,
	0.513885, 0.285492, 0.513885, 0.285492, 0.285492, 0.513885, 0.570984, 0.456787, 0.570984, 0.457173,
	0.314041, 0.513885, 0.570984, 0.285492, 0.314041, 0.542435, 0.285492, 0.856476, 0.570984, 0.513885,
	0.570984, 0.542435, 0.402004, 0.405399, 0.399689, 0.570984, 0.542435, 0.742279, 0.542435, 0.542435,
	0.456787, 0.513885, 1.02777, 0.513885, 0.513885,
}

// Math widths in em of their fonts (TFM files as above).
const (
	emDigit     = 0.513885 // cmr9 digits
	emDot       = 0.285492 // cmmi9 period
	emBoldDigit = 0.59166  // cmbx9 digits
	emBoldDot   = 0.3287   // cmbx9 period
	emBinary    = 0.799377 // cmsy9 ± and −, cmr9 +, cmmi9 <
	emInfty     = 1.027771 // cmsy9 \infty
	emDigit6    = 0.611104 // cmr6 digits
	emDot6      = 0.379628 // cmmi6 period
	emSign6     = 0.962956 // cmsy6 −; cmr6 + is 0.935176
	emDagger6   = 0.574071 // cmsy6 \dagger
	// medmuskip, the space on each side of a binary operator: 4mu, where
	// 18mu is the quad of cmsy9 (1.027771 em).
	ptMedMu       = 4.0 / 18 * 1.027771 * texPt
	ptScriptSpace = 0.5 // \scriptspace
)

// texTextWidth is the estimated width in pt of s as plain text at \small.
func texTextWidth(s string) float64 {
	st, _ := renderTeX(s)
	return st.em * texPt
}

// mathNumberWidth is the width in pt at \small of a number written in math
// mode (digits, '.', a leading sign), in bold or not.
func mathNumberWidth(s string, bold bool) float64 {
	var em float64
	for i, c := range s {
		switch {
		case c >= '0' && c <= '9':
			em += pick(bold, emBoldDigit, emDigit)
		case c == '.':
			em += pick(bold, emBoldDot, emDot)
		case c == '-' || c == '+' || c == '<':
			em += emBinary
			if i > 0 {
				em += 2 * ptMedMu / texPt
			}
		default:
			em += 0.6
		}
	}
	return em * texPt
}

// scriptNumberWidth is the width in pt of a signed number as a first-level
// script (6 pt).
func scriptNumberWidth(s string) float64 {
	var em float64
	for _, c := range s {
		switch {
		case c >= '0' && c <= '9':
			em += emDigit6
		case c == '.':
			em += emDot6
		default:
			em += emSign6
		}
	}
	return em * texScriptPt
}

func pick(b bool, x, y float64) float64 {
	if b {
		return x
	}
	return y
}

// splitDecimal splits a formatted number at its decimal point.
func splitDecimal(s string) (left, right string, ok bool) {
	i := strings.IndexByte(s, '.')
	if i < 0 {
		return s, "", false
	}
	return s[:i], s[i+1:], true
}

// mathW are the widths in pt at \small of the math in table headers:
// cmmi9 letters with the italic correction TeX adds at the end of a
// formula or before a superscript, cmr9 \Delta, 6 pt scripts plus
// \scriptspace (TFM files as above; TestTeXWidthsAgainstPdflatex checks
// them).
var mathW = map[string]float64{
	"N":      (0.821601 + 0.108026) * texPt,
	"k":      (0.535106 + 0.029321) * texPt,
	"p":      0.515932 * texPt,
	"F":      (0.656246 + 0.142746) * texPt,
	"F_1":    0.656246*texPt + emDigit6*texScriptPt + ptScriptSpace,
	"R^+":    (0.777629+0.00705)*texPt + 0.935176*texScriptPt + ptScriptSpace,
	"R^-":    (0.777629+0.00705)*texPt + emSign6*texScriptPt + ptScriptSpace,
	`\Delta`: 0.856476 * texPt,
	`\chi^2`: 0.640815*texPt + emDigit6*texScriptPt + ptScriptSpace,
}

// headCell returns a header cell from parts that alternate plain text and
// math (keys of mathW): headCell("", "p", " adj.") is "$p$ adj.".
func headCell(parts ...string) tcell {
	var tex strings.Builder
	var w float64
	for i, p := range parts {
		if i%2 == 0 {
			tex.WriteString(TeXEscape(p))
			w += texTextWidth(p)
			continue
		}
		mw, ok := mathW[p]
		if !ok {
			panic("results: internal: no width for header math " + p)
		}
		tex.WriteString("$" + p + "$")
		w += mw
	}
	return tcell{tex: tex.String(), w: w, pieces: []float64{w}}
}
