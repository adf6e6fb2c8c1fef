package results

import (
	"fmt"
	"sort"
	"strings"
	"unicode/utf8"
)

// Text in the LaTeX files is pure ASCII: every character is written as
// something pdflatex typesets with the default fonts of a plain TeX Live
// (OT1 Computer Modern, no package beyond the kernel), so summary.tex
// compiles whatever input encoding, font encoding or engine the including
// document uses.
//
//   - ASCII: the special characters & % $ # _ { } ~ ^ \ are escaped, and
//     < > | " (which OT1 fonts would print as ¡ ¿ — ”) become \textless,
//     \textgreater, \textbar and a typewriter ".
//   - Latin letters with accents (Latin-1 and Latin Extended-A) become
//     accent commands (é → \'{e}, ő → \H{o}), and æ ø ß œ ł and friends
//     their kernel commands; a few symbols (± × ° µ § ...) their kernel or
//     math equivalents.
//   - Greek letters become math symbols (α → \ensuremath{\alpha}; capitals
//     that look Latin become the Latin letter, Α → A).
//   - Letters OT1 cannot accent or has no glyph for (ogonek, Đ, Þ, ...)
//     are transliterated (ą → a, Þ → Th), with a warning.
//   - Anything else (CJK, other scripts, emoji) is written as its code
//     point in typewriter type, \texttt{U+4E2D}, with a warning; the CSV
//     files and summary.md keep the name as it is.
//
// Control characters become spaces (tab, newline) or are dropped, with a
// warning.

// latinAccents lists, three runes per letter, a precomposed Latin letter,
// the OT1 accent command letter and the base letter, from the Unicode
// canonical decompositions of U+00C0–U+017F (Python 3.11 unicodedata)
// whose combining mark OT1 has an accent for.
const latinAccents = "À`AÁ'AÂ^AÃ~AÄ\"AÅrAÇcCÈ`EÉ'EÊ^EË\"EÌ`IÍ'IÎ^IÏ\"IÑ~NÒ`OÓ'OÔ^OÕ~O" +
	"Ö\"OÙ`UÚ'UÛ^UÜ\"UÝ'Yà`aá'aâ^aã~aä\"aåraçccè`eé'eê^eë\"eì`ií'iî^i" +
	"ï\"iñ~nò`oó'oô^oõ~oö\"où`uú'uû^uü\"uý'yÿ\"yĀ=Aā=aĂuAăuaĆ'Cć'cĈ^C" +
	"ĉ^cĊ.Cċ.cČvCčvcĎvDďvdĒ=Eē=eĔuEĕueĖ.Eė.eĚvEěveĜ^Gĝ^gĞuGğugĠ.G" +
	"ġ.gĢcGģcgĤ^Hĥ^hĨ~Iĩ~iĪ=Iī=iĬuIĭuiİ.IĴ^Jĵ^jĶcKķckĹ'Lĺ'lĻcLļcl" +
	"ĽvLľvlŃ'Nń'nŅcNņcnŇvNňvnŌ=Oō=oŎuOŏuoŐHOőHoŔ'Rŕ'rŖcRŗcrŘvRřvr" +
	"Ś'Sś'sŜ^Sŝ^sŞcSşcsŠvSšvsŢcTţctŤvTťvtŨ~Uũ~uŪ=Uū=uŬuUŭuuŮrUůru" +
	"ŰHUűHuŴ^Wŵ^wŶ^Yŷ^yŸ\"YŹ'Zź'zŻ.Zż.zŽvZžvz"

// combiningAccents maps combining marks to OT1 accent command letters.
var combiningAccents = map[rune]byte{
	0x0300: '`', 0x0301: '\'', 0x0302: '^', 0x0303: '~', 0x0308: '"', 0x0304: '=', 0x0307: '.',
	0x0306: 'u', 0x030C: 'v', 0x030B: 'H', 0x030A: 'r', 0x0327: 'c', 0x0323: 'd', 0x0331: 'b',
}

type accented struct {
	accent byte
	base   byte
}

var latinAccentMap = func() map[rune]accented {
	m := map[rune]accented{}
	rs := []rune(latinAccents)
	for i := 0; i+2 < len(rs); i += 3 {
		m[rs[i]] = accented{byte(rs[i+1]), byte(rs[i+2])}
	}
	return m
}()

// texSym is a character written as a LaTeX command: its TeX, its width in
// em of the text font (estimated where it is a math symbol) and whether
// it is a transliteration (warned about).
type texSym struct {
	tex      string
	em       float64
	translit bool
}

// Widths in em from the TFM files of Computer Modern at 9 pt (cmr9, cmmi9,
// cmsy9, cmtt9; tftopl, TeX Live 2022); see texWidthASCII.
var texSymbols = map[rune]texSym{
	'Æ': {`\AE{}`, 0.927772, false}, 'æ': {`\ae{}`, 0.742279, false},
	'Œ': {`\OE{}`, 1.041968, false}, 'œ': {`\oe{}`, 0.799377, false},
	'Ø': {`\O{}`, 0.799377, false}, 'ø': {`\o{}`, 0.513885, false},
	'ß': {`\ss{}`, 0.513885, false}, 'Ł': {`\L{}`, 0.64228, false}, 'ł': {`\l{}`, 0.285492, false},
	'ı': {`\i{}`, 0.285492, false}, 'ȷ': {`\j{}`, 0.314041, false},
	'\u00a0': {`~`, 0.34259, false}, '¡': {"!`", 0.285492, false}, '¿': {"?`", 0.485336, false},
	'£': {`\pounds{}`, 0.6, false}, '§': {`\S{}`, 0.456787, false}, '¶': {`\P{}`, 0.570984, false},
	'©': {`\copyright{}`, 1.0, false}, '®': {`\textregistered{}`, 1.0, false},
	'ª': {`\textsuperscript{a}`, 0.4, false}, 'º': {`\textsuperscript{o}`, 0.4, false},
	'«': {`\ensuremath{\ll}`, 1.027771, false}, '»': {`\ensuremath{\gg}`, 1.027771, false},
	'¬': {`\ensuremath{\neg}`, 0.685, false}, '°': {`\ensuremath{^\circ}`, 0.4, false},
	'±': {`\ensuremath{\pm}`, 0.799377, false}, '×': {`\ensuremath{\times}`, 0.799377, false},
	'÷': {`\ensuremath{\div}`, 0.799377, false}, 'µ': {`\ensuremath{\mu}`, 0.62, false},
	'·': {`\ensuremath{\cdot}`, 0.285492, false}, '¹': {`\ensuremath{^1}`, 0.4, false},
	'²': {`\ensuremath{^2}`, 0.4, false}, '³': {`\ensuremath{^3}`, 0.4, false},
	'¼': {`\ensuremath{\frac14}`, 0.6, false}, '½': {`\ensuremath{\frac12}`, 0.6, false}, '¾': {`\ensuremath{\frac34}`, 0.6, false},
	'¨': {`\"{}`, 0.513885, false}, '´': {`\'{}`, 0.513885, false}, '¯': {`\={}`, 0.513885, false}, '¸': {`\c{}`, 0.456787, false},
	'\u00ad': {``, 0, false}, '\u200b': {``, 0, false},
	'‐': {`-`, 0.34259, false}, '‑': {`-`, 0.34259, false}, '‒': {`-`, 0.34259, false},
	'–': {`--`, 0.513885, false}, '—': {`---`, 1.027771, false},
	'‘': {"`", 0.285492, false}, '’': {`'`, 0.285492, false}, '“': {"``", 0.513885, false}, '”': {`''`, 0.513885, false},
	'†': {`\dag{}`, 0.456787, false}, '‡': {`\ddag{}`, 0.456787, false}, '•': {`\textbullet{}`, 0.513885, false},
	'…': {`\ldots{}`, 1.2, false}, '′': {`\ensuremath{'}`, 0.3, false},
	'\u2002': {` `, 0.34259, false}, '\u2003': {` `, 0.34259, false}, '\u2009': {`\,`, 0.166667, false},
	'−': {`\ensuremath{-}`, 0.799377, false}, '≤': {`\ensuremath{\leq}`, 0.799377, false},
	'≥': {`\ensuremath{\geq}`, 0.799377, false}, '≠': {`\ensuremath{\neq}`, 0.799377, false},
	'≈': {`\ensuremath{\approx}`, 0.799377, false}, '∞': {`\ensuremath{\infty}`, 1.027771, false},
	'→': {`\ensuremath{\rightarrow}`, 1.027771, false}, '←': {`\ensuremath{\leftarrow}`, 1.027771, false},
	'∂': {`\ensuremath{\partial}`, 0.57, false}, '√': {`\ensuremath{\surd}`, 0.85, false},
	'∈': {`\ensuremath{\in}`, 0.685, false}, '∗': {`\ensuremath{\ast}`, 0.513885, false},
	'⋅': {`\ensuremath{\cdot}`, 0.285492, false}, '™': {`\ensuremath{^{\mathrm{TM}}}`, 0.9, false},
	// Transliterations: no OT1 glyph or accent.
	'Ð': {`D`, 0.785026, true}, 'ð': {`d`, 0.570984, true}, 'Đ': {`D`, 0.785026, true}, 'đ': {`d`, 0.570984, true},
	'Þ': {`Th`, 1.313, true}, 'þ': {`th`, 0.970673, true}, 'Ħ': {`H`, 0.770674, true}, 'ħ': {`h`, 0.570984, true},
	'Ĳ': {`IJ`, 0.899068, true}, 'ĳ': {`ij`, 0.599533, true}, 'ĸ': {`k`, 0.542435, true},
	'Ŀ': {`L`, 0.64228, true}, 'ŀ': {`l`, 0.285492, true}, 'ŉ': {`'n`, 0.856476, true},
	'Ŋ': {`N`, 0.770674, true}, 'ŋ': {`n`, 0.570984, true}, 'Ŧ': {`T`, 0.742279, true}, 'ŧ': {`t`, 0.399689, true},
	'ſ': {`s`, 0.405399, true},
	'Ą': {`A`, 0.770674, true}, 'ą': {`a`, 0.513885, true}, 'Ę': {`E`, 0.699378, true}, 'ę': {`e`, 0.457173, true},
	'Į': {`I`, 0.370985, true}, 'į': {`i`, 0.285492, true}, 'Ų': {`U`, 0.770674, true}, 'ų': {`u`, 0.570984, true},
	'€': {`EUR`, 2.2, true},
}

// greekMath maps the Greek alphabet to math symbols (lower case) or to
// Latin capitals where the Greek capital looks the same (upright, as the
// Greek capitals \Gamma ... are).
var greekMath = map[rune]string{
	'Α': "A", 'Β': "B", 'Γ': `\Gamma`, 'Δ': `\Delta`, 'Ε': "E", 'Ζ': "Z", 'Η': "H", 'Θ': `\Theta`,
	'Ι': "I", 'Κ': "K", 'Λ': `\Lambda`, 'Μ': "M", 'Ν': "N", 'Ξ': `\Xi`, 'Ο': "O", 'Π': `\Pi`,
	'Ρ': "P", 'Σ': `\Sigma`, 'Τ': "T", 'Υ': `\Upsilon`, 'Φ': `\Phi`, 'Χ': "X", 'Ψ': `\Psi`, 'Ω': `\Omega`,
	'α': `\alpha`, 'β': `\beta`, 'γ': `\gamma`, 'δ': `\delta`, 'ε': `\varepsilon`, 'ζ': `\zeta`,
	'η': `\eta`, 'θ': `\theta`, 'ι': `\iota`, 'κ': `\kappa`, 'λ': `\lambda`, 'μ': `\mu`, 'ν': `\nu`,
	'ξ': `\xi`, 'ο': `o`, 'π': `\pi`, 'ρ': `\rho`, 'ς': `\varsigma`, 'σ': `\sigma`, 'τ': `\tau`,
	'υ': `\upsilon`, 'φ': `\varphi`, 'χ': `\chi`, 'ψ': `\psi`, 'ω': `\omega`,
	'ϑ': `\vartheta`, 'ϕ': `\phi`, 'ϖ': `\varpi`, 'ϵ': `\epsilon`, 'ϱ': `\varrho`,
}

// greekAccented maps Greek letters with tonos or dialytika to the letter
// and a math accent (tonos as \acute, dialytika as \ddot).
var greekAccented = map[rune][2]string{
	'Ά': {"Α", `\acute`}, 'Έ': {"Ε", `\acute`}, 'Ή': {"Η", `\acute`}, 'Ί': {"Ι", `\acute`}, 'Ό': {"Ο", `\acute`},
	'Ύ': {"Υ", `\acute`}, 'Ώ': {"Ω", `\acute`}, 'Ϊ': {"Ι", `\ddot`}, 'Ϋ': {"Υ", `\ddot`},
	'ά': {"α", `\acute`}, 'έ': {"ε", `\acute`}, 'ή': {"η", `\acute`}, 'ί': {"ι", `\acute`}, 'ό': {"ο", `\acute`},
	'ύ': {"υ", `\acute`}, 'ώ': {"ω", `\acute`}, 'ϊ': {"ι", `\ddot`}, 'ϋ': {"υ", `\ddot`},
	'ΐ': {"ι", `\acute`}, 'ΰ': {"υ", `\acute`},
}

// greekEm is the width in em of the Greek math symbols, italic correction
// included (cmmi9.tfm for the lower case, cmr9.tfm for the upright
// capitals).
var greekEm = map[string]float64{
	`\alpha`: 0.659448, `\beta`: 0.631363, `\gamma`: 0.587943, `\delta`: 0.493554, `\epsilon`: 0.416393, `\zeta`: 0.522084,
	`\eta`: 0.549072, `\theta`: 0.509643, `\iota`: 0.363811, `\kappa`: 0.592204, `\lambda`: 0.599533, `\mu`: 0.61921,
	`\nu`: 0.57137, `\xi`: 0.493535, `\pi`: 0.624108, `\rho`: 0.529436, `\sigma`: 0.623568, `\tau`: 0.56701,
	`\upsilon`: 0.592204, `\phi`: 0.611725, `\chi`: 0.640815, `\psi`: 0.706401, `\omega`: 0.675304, `\varepsilon`: 0.477119,
	`\vartheta`: 0.609488, `\varpi`: 0.881051, `\varrho`: 0.529436, `\varsigma`: 0.453508, `\varphi`: 0.671138, `o`: 0.497528,
	`\Gamma`: 0.64228, `\Delta`: 0.856476, `\Theta`: 0.799377, `\Lambda`: 0.713575, `\Xi`: 0.685181, `\Pi`: 0.770674,
	`\Sigma`: 0.742279, `\Upsilon`: 0.799377, `\Phi`: 0.742279, `\Psi`: 0.799377, `\Omega`: 0.742279,
}

// texASCII returns the TeX of one printable ASCII byte and its width in
// em of cmr9.
func texASCII(c byte) (string, float64) {
	switch c {
	case '\\':
		return `\textbackslash{}`, 0.513885
	case '&', '%', '$', '#':
		return `\` + string(c), texWidthASCII[c-32]
	case '_':
		return `\_`, 0.36 // \textunderscore: \kern.06em plus a .3em rule (LaTeX kernel)
	case '{', '}':
		return `\` + string(c), 0.513885 // cmsy9 braces
	case '~':
		return `\textasciitilde{}`, 0.513885
	case '^':
		return `\textasciicircum{}`, 0.513885
	case '<':
		return `\textless{}`, 0.799377 // cmmi9
	case '>':
		return `\textgreater{}`, 0.799377
	case '|':
		return `\textbar{}`, 0.285492 // cmsy9
	case '"':
		return `\texttt{"}`, 0.524994 // cmtt9
	case ' ':
		return " ", 0.34259 // interword space of cmr9
	}
	return string(c), texWidthASCII[c-32]
}

// texStr is a string rendered for LaTeX text: its TeX, its estimated
// width in em of the text font, and the widths of its unbreakable pieces
// when line breaks are allowed after spaces, '-', '_', '/' and '+'.
type texStr struct {
	tex    string
	em     float64
	pieces []float64
	// pieceTeX is the TeX of each piece (spaces between pieces dropped).
	pieceTeX []string
	// wrapTeX is tex with \allowbreak after '_', '/' and '+' (a '-' lets
	// TeX break after it by itself), for columns that wrap.
	wrapTeX string
}

// maxPiece is the widest unbreakable piece in em.
func (s texStr) maxPiece() float64 {
	var m float64
	for _, p := range s.pieces {
		m = max(m, p)
	}
	return m
}

// texWarnings collects the characters of one string that were
// transliterated or written as code points.
type texWarnings struct {
	translit map[rune]string
	codes    []rune
	control  bool
}

func (w *texWarnings) messages(s string) []string {
	var out []string
	if len(w.translit) > 0 {
		keys := make([]rune, 0, len(w.translit))
		for r := range w.translit {
			keys = append(keys, r)
		}
		sort.Slice(keys, func(i, j int) bool { return keys[i] < keys[j] })
		parts := make([]string, len(keys))
		for i, r := range keys {
			parts[i] = fmt.Sprintf("%c as %s", r, w.translit[r])
		}
		out = append(out, fmt.Sprintf("%q: pdflatex's default fonts lack %s; transliterated (the CSV files and summary.md keep the name)", s, strings.Join(parts, ", ")))
	}
	if len(w.codes) > 0 {
		parts := make([]string, len(w.codes))
		for i, r := range w.codes {
			parts[i] = fmt.Sprintf("U+%04X", r)
		}
		out = append(out, fmt.Sprintf("%q: characters outside what pdflatex typesets with its default fonts (%s) are written as their code points (the CSV files and summary.md keep the name; for the name itself, typeset a copy of the table with lualatex or xelatex and a font that has them)", s, strings.Join(parts, " ")))
	}
	if w.control {
		out = append(out, fmt.Sprintf("%q: control characters replaced by spaces or dropped", s))
	}
	return out
}

// texToken is one character as written: its TeX, its width in em, and
// whether a line may break after it (or, for a space, instead of it).
type texToken struct {
	tex    string
	em     float64
	brk    bool // a line may break after it
	space  bool // an interword space: a break point, not part of a piece
	letter byte // a plain ASCII letter, which a combining accent may take
}

// renderTeX renders s for LaTeX text (see the comment at the top of this
// file) and returns the warnings about it.
func renderTeX(s string) (texStr, []string) {
	var w texWarnings
	var toks []texToken
	translit := func(r rune, as string) {
		if w.translit == nil {
			w.translit = map[rune]string{}
		}
		w.translit[r] = as
	}
	space := texToken{tex: " ", em: texWidthASCII[0], space: true}
	for i, r := range s {
		if r == utf8.RuneError {
			if _, size := utf8.DecodeRuneInString(s[i:]); size == 1 {
				w.codes = append(w.codes, r)
				toks = append(toks, texToken{tex: `\texttt{?}`, em: 0.524994})
				continue
			}
		}
		switch {
		case r == ' ':
			toks = append(toks, space)
		case r < 0x20 || r == 0x7f || (r >= 0x80 && r < 0xa0):
			w.control = true
			if r == '\t' || r == '\n' || r == '\r' {
				toks = append(toks, space)
			}
		case r < 0x80:
			tex, em := texASCII(byte(r))
			t := texToken{tex: tex, em: em, brk: r == '-' || r == '_' || r == '/' || r == '+'}
			if (r >= 'a' && r <= 'z') || (r >= 'A' && r <= 'Z') {
				t.letter = byte(r)
			}
			toks = append(toks, t)
		default:
			if a, ok := latinAccentMap[r]; ok {
				toks = append(toks, texToken{tex: accentTeX(a.accent, a.base), em: texWidthASCII[a.base-32]})
				break
			}
			if acc, ok := combiningAccents[r]; ok && len(toks) > 0 && toks[len(toks)-1].letter != 0 {
				last := &toks[len(toks)-1]
				last.tex = accentTeX(acc, last.letter)
				last.letter = 0
				break
			}
			if sym, ok := texSymbols[r]; ok {
				if sym.translit {
					translit(r, sym.tex)
				}
				toks = append(toks, texToken{tex: sym.tex, em: sym.em})
				break
			}
			if g, ok := greekMath[r]; ok {
				if len(g) == 1 {
					toks = append(toks, texToken{tex: g, em: texWidthASCII[g[0]-32]})
				} else {
					toks = append(toks, texToken{tex: `\ensuremath{` + g + `}`, em: greekEm[g]})
				}
				break
			}
			if ga, ok := greekAccented[r]; ok {
				base := greekMath[[]rune(ga[0])[0]]
				toks = append(toks, texToken{tex: `\ensuremath{` + ga[1] + `{` + base + `}}`, em: greekEm[base]})
				break
			}
			if r >= 0x0300 && r < 0x0370 {
				// A combining mark without an OT1 accent or a letter before it.
				translit(r, "nothing")
				break
			}
			w.codes = append(w.codes, r)
			code := fmt.Sprintf("U+%04X", r)
			toks = append(toks, texToken{tex: `\texttt{` + code + `}`, em: 0.524994 * float64(len(code))})
		}
	}
	var st texStr
	var out, wrap, pieceTeX strings.Builder
	var piece float64
	flush := func() {
		st.pieces = append(st.pieces, piece)
		st.pieceTeX = append(st.pieceTeX, pieceTeX.String())
		piece = 0
		pieceTeX.Reset()
	}
	for _, t := range toks {
		out.WriteString(t.tex)
		wrap.WriteString(t.tex)
		st.em += t.em
		if t.space {
			flush()
			continue
		}
		piece += t.em
		pieceTeX.WriteString(t.tex)
		if t.brk {
			if t.tex != "-" {
				wrap.WriteString(`\allowbreak{}`)
			}
			flush()
		}
	}
	flush()
	st.tex, st.wrapTeX = out.String(), wrap.String()
	return st, w.messages(s)
}

// accentTeX writes an OT1 accent command over an ASCII letter (dotless i
// and j under accents above the letter).
func accentTeX(accent, base byte) string {
	b := string(base)
	above := accent != 'c' && accent != 'd' && accent != 'b'
	if above && (base == 'i' || base == 'j') {
		b = `\` + b
	}
	return `\` + string(accent) + `{` + b + `}`
}

// TeXText returns s as LaTeX text that pdflatex typesets with its default
// fonts and no package (see the comment at the top of textext.go for the
// rules), and warnings naming the characters that were transliterated or
// written as code points.
func TeXText(s string) (string, []string) {
	st, warn := renderTeX(s)
	return st.tex, warn
}

// TeXEscape returns TeXText(s) without its warnings.
func TeXEscape(s string) string {
	st, _ := renderTeX(s)
	return st.tex
}

// TeXLabelKey returns s as a \label key made of the safe alphabet ASCII
// letters, digits, ':', '-' and '.': every other character (including
// space, '%', '#', '{', '}', '~', '_' and anything outside ASCII) becomes
// '-'. Such keys survive \label, \ref, hyperref and the aux file whatever
// packages the document loads (':' is the one character some babel
// languages make active; LaTeX since 2019 protects label keys from that).
// An empty key becomes "tab".
func TeXLabelKey(s string) string {
	if s == "" {
		return "tab"
	}
	var b strings.Builder
	for _, r := range s {
		switch {
		case r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z', r >= '0' && r <= '9', r == ':', r == '-', r == '.':
			b.WriteRune(r)
		default:
			b.WriteByte('-')
		}
	}
	return b.String()
}
