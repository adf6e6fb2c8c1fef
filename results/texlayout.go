package results

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// The table engine of summary.tex. A table is a list of columns and rows
// with the estimated width of every cell (texwidth.go); fit chooses the
// column separation and the widths of wrapping columns so that the table
// fits the room of the layout, and emit writes it as a table, table* or
// longtable with booktabs rules and dcolumn number columns.
//
// Estimated width of a table: the sum of its column widths plus the
// column separation, 2·\tabcolsep between neighbouring columns (none
// between a number and the interval that follows it, none at the outer
// edges: the preamble starts and ends with @{}). A text column is as
// wide as its widest cell (or header); a number column D{.}{.}{x.y} is
// x + y digit widths plus the decimal point, x and y counted from its
// widest integer and fractional parts (bold digits included). A header
// spanning several columns widens the last of them when it is wider.
//
// Fitting, in order: \tabcolsep 6 pt, then 5 pt, then 4 pt; then the
// wrapping columns (names) become ragged-right p columns, the widest
// first, down to their longest unbreakable piece (names break after
// spaces, '-', '_', '/' and '+'). A table that still does not fit is
// written with its narrowest layout and a warning.

type colKind uint8

const (
	colText   colKind = iota // l, or a ragged-right p column when it wraps
	colNum                   // dcolumn D{.}{.}{x.y}, numbers aligned on the point
	colSpread                // math, after a colNum with no space between: "± h" or "^{+a}_{-b}"
)

type tcol struct {
	kind     colKind
	wrap     bool // a text column that may wrap
	joinPrev bool // no column separation before this column
}

// tcell is one cell. For number columns num holds the formatted number
// (digits, '.', a sign); tex is used as given otherwise.
type tcell struct {
	tex      string
	wrapTeX  string    // tex with break points, for a wrapped column
	w        float64   // natural width in pt (text and spread cells)
	pieces   []float64 // unbreakable pieces in pt (text cells)
	pieceTeX []string  // the TeX of each piece (header cells, which may stack)
	num      string    // number columns: the number, written in math
	bold     bool      // number columns: bold digits
	text     bool      // number columns: a text cell (\multicolumn{1}{c}{...})
	span     int       // header cells: columns spanned (0 or 1: one)
	align    byte      // header cells: 'l', 'c' or 'r'
}

type trow struct {
	cells  []tcell
	group  string  // non-empty: a row spanning every column with this TeX
	groupW float64 // its width
	rule   string  // a rule before the row (\midrule, \cmidrule...), or ""
	unit   int     // rows with the same unit stay together when a table is split
}

type ttable struct {
	key       string // label key
	caption   string // TeX
	captionEm float64
	cols      []tcol
	head      [][]tcell
	headRules []string // rules after each header row ("" for none)
	rows      []trow
}

// texNumber returns a number cell.
func texNumber(s string, bold bool) tcell { return tcell{num: s, bold: bold} }

// texNumText returns a text cell in a number column (centred).
func texNumText(tex string, w float64) tcell { return tcell{tex: tex, w: w, text: true} }

// texTextCell renders a name as a text cell.
func texTextCell(s string, warn *[]string) tcell {
	st, ws := renderTeX(s)
	*warn = append(*warn, ws...)
	pieces := make([]float64, len(st.pieces))
	for i, p := range st.pieces {
		pieces[i] = p * texPt
	}
	return tcell{tex: st.tex, wrapTeX: st.wrapTeX, w: st.em * texPt, pieces: pieces, pieceTeX: st.pieceTeX}
}

// texRaw returns a cell of given TeX and estimated width.
func texRaw(tex string, w float64) tcell { return tcell{tex: tex, w: w, pieces: []float64{w}} }

// numParts returns the widths in pt of the integer and fractional parts of
// a number cell and whether it has a decimal point.
func numParts(c tcell) (left, right float64, dot bool) {
	if c.text {
		return 0, 0, false
	}
	l, r, ok := splitDecimal(c.num)
	if !ok {
		return mathNumberWidth(c.num, c.bold), 0, false
	}
	return mathNumberWidth(l, c.bold), mathNumberWidth(r, c.bold), true
}

// numCol is the geometry of a number column.
type numCol struct {
	x, y  int     // digit widths left and right of the point
	width float64 // pt
}

// leftSlack is how far the integer part of a number may stick out to the
// left of its box (bold digits are 0.7 pt wider than the box counts); it
// lies in the column separation and triggers no warning (the box has
// \hss).
const leftSlack = 1.0

func (t *ttable) numGeometry(j int) numCol {
	var maxL, maxR, textW float64
	for _, r := range t.rows {
		if r.group != "" || j >= len(r.cells) {
			continue
		}
		c := r.cells[j]
		if c.text {
			textW = max(textW, c.w)
			continue
		}
		l, rr, _ := numParts(c)
		maxL, maxR = max(maxL, l), max(maxR, rr)
	}
	d := emDigit * texPt
	x := max(1, int(math.Ceil((maxL-leftSlack)/d-1e-9)))
	y := max(0, int(math.Ceil(maxR/d-1e-9)))
	w := float64(x+y)*d + emDot*texPt
	return numCol{x: x, y: y, width: max(w, textW)}
}

// natural returns the natural width of every column's content.
func (t *ttable) natural() ([]float64, []numCol) {
	w := make([]float64, len(t.cols))
	nc := make([]numCol, len(t.cols))
	for j, c := range t.cols {
		if c.kind == colNum {
			nc[j] = t.numGeometry(j)
			w[j] = nc[j].width
			continue
		}
		for _, r := range t.rows {
			if r.group == "" && j < len(r.cells) {
				w[j] = max(w[j], r.cells[j].w)
			}
		}
	}
	for _, h := range t.head {
		j := 0
		for _, c := range h {
			if span := max(c.span, 1); span == 1 && j < len(w) {
				w[j] = max(w[j], c.w)
			}
			j += max(c.span, 1)
		}
	}
	return w, nc
}

// minWidth returns the narrowest a wrapping column can be: its widest
// unbreakable piece (and its header).
func (t *ttable) minWidth(j int) float64 {
	var m float64
	for _, r := range t.rows {
		if r.group != "" || j >= len(r.cells) {
			continue
		}
		for _, p := range r.cells[j].pieces {
			m = max(m, p)
		}
	}
	for _, h := range t.head {
		k := 0
		for _, c := range h {
			if k == j && max(c.span, 1) == 1 {
				m = max(m, c.w)
			}
			k += max(c.span, 1)
		}
	}
	return m
}

// layout is a fitted table: the column separation, the width of each
// column's content, the wrapping columns that wrap, the total width.
type layout struct {
	stacks    map[[2]int][]string // stacked headers
	headLines int                 // lines of the tallest header
	sep       float64
	widths    []float64
	nums      []numCol
	wrapped   []bool
	total     float64
	fits      bool
	wraps     bool // some column wraps
}

// seps returns the total column separation at \tabcolsep sep.
func (t *ttable) seps(sep float64) float64 {
	n := 0
	for j, c := range t.cols {
		if j > 0 && !c.joinPrev {
			n++
		}
	}
	return 2 * sep * float64(n)
}

// spanExcess places the headers: a header wider than its columns is
// stacked on several lines (at its break points) when that helps, and the
// last of its columns is widened by what remains. It returns the stacked
// headers by (header row, cell) and the most lines of any of them.
func (t *ttable) spanExcess(w []float64, sep float64) (map[[2]int][]string, int) {
	stacks := map[[2]int][]string{}
	most := 1
	for hi, h := range t.head {
		j := 0
		for ci, c := range h {
			span := max(c.span, 1)
			if j+span > len(w) {
				break
			}
			have := 0.0
			for k := j; k < j+span; k++ {
				have += w[k]
				if k > j && !t.cols[k].joinPrev {
					have += 2 * sep
				}
			}
			need := c.w
			if need > have && len(c.pieces) > 1 && len(c.pieceTeX) == len(c.pieces) {
				lines, lw := stackLines(c.pieces, c.pieceTeX, have)
				if len(lines) > 1 {
					stacks[[2]int{hi, ci}] = lines
					most = max(most, len(lines))
					need = lw
				}
			}
			if need > have {
				w[j+span-1] += need - have
			}
			j += span
		}
	}
	return stacks, most
}

// stackLines fills pieces into lines of at most width (greedy; a piece
// wider than width gets a line of its own) and returns the lines' TeX and
// the widest line.
func stackLines(pieces []float64, texs []string, width float64) ([]string, float64) {
	var lines []string
	var cur strings.Builder
	var curW, widest float64
	space := texWidthASCII[0] * texPt
	for i, p := range pieces {
		if texs[i] == "" {
			continue
		}
		join := 0.0
		if curW > 0 && !strings.HasSuffix(cur.String(), "-") && !strings.HasSuffix(cur.String(), "{}") {
			join = space
		}
		if curW > 0 && curW+join+p > width {
			lines = append(lines, cur.String())
			widest = max(widest, curW)
			cur.Reset()
			curW, join = 0, 0
		}
		if join > 0 {
			cur.WriteString(" ")
		}
		cur.WriteString(texs[i])
		curW += join + p
	}
	if curW > 0 {
		lines = append(lines, cur.String())
		widest = max(widest, curW)
	}
	return lines, widest
}

func sum(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v
	}
	return s
}

// fit lays the table out in avail pt. floor is the narrowest a wrapping
// column may become (0: its longest piece).
func (t *ttable) fit(avail, floor float64) layout {
	nat, nums := t.natural()
	var l layout
	for _, sep := range []float64{6, 5, 4} {
		w := append([]float64(nil), nat...)
		stacks, most := t.spanExcess(w, sep)
		l = layout{sep: sep, widths: w, nums: nums, wrapped: make([]bool, len(w)), total: sum(w) + t.seps(sep), stacks: stacks, headLines: most}
		if l.total <= avail {
			l.fits = true
			return l
		}
	}
	// Wrap at the narrowest separation.
	sep := l.sep
	fixed := t.seps(sep)
	var wrapIdx []int
	for j, c := range t.cols {
		if c.wrap {
			wrapIdx = append(wrapIdx, j)
		} else {
			fixed += nat[j]
		}
	}
	lo := make(map[int]float64)
	var loSum float64
	for _, j := range wrapIdx {
		lo[j] = min(nat[j], max(t.minWidth(j), floor))
		loSum += lo[j]
	}
	// p{} widths are written rounded up to 0.1 pt: keep room for that.
	room := avail - fixed - 0.1*float64(len(wrapIdx))
	widths := append([]float64(nil), nat...)
	capAt := func(c float64) float64 {
		var s float64
		for _, j := range wrapIdx {
			s += min(nat[j], max(lo[j], c))
		}
		return s
	}
	if len(wrapIdx) == 0 || room < loSum {
		for _, j := range wrapIdx {
			widths[j] = lo[j]
		}
	} else {
		a, b := 0.0, avail
		for range 60 {
			m := (a + b) / 2
			if capAt(m) <= room {
				a = m
			} else {
				b = m
			}
		}
		for _, j := range wrapIdx {
			widths[j] = min(nat[j], max(lo[j], a))
		}
	}
	l = layout{sep: sep, widths: widths, nums: nums, wrapped: make([]bool, len(widths))}
	for _, j := range wrapIdx {
		if widths[j] < nat[j]-1e-9 {
			l.wrapped[j] = true
			l.wraps = true
			widths[j] = roundUp(widths[j])
		}
	}
	l.stacks, l.headLines = t.spanExcess(l.widths, sep)
	l.total = sum(l.widths) + t.seps(sep)
	l.fits = l.total <= avail+1e-6
	return l
}

// lines returns the number of lines of a cell in a column of width w:
// greedy filling of 85% of the width, since TeX's ragged-right line
// breaking may leave lines shorter than the greedy fill (an estimate that
// errs high).
func lines(c tcell, w float64) int {
	n, cur := 1, 0.0
	w *= 0.85
	for _, p := range c.pieces {
		switch {
		case cur == 0:
			cur = p
		case cur+p <= w:
			cur += p
		default:
			n++
			cur = p
		}
	}
	return n
}

// Vertical sizes in pt at \small in a 10 pt article: rows are one
// \baselineskip (11 pt, the strut); booktabs rules with their spacing
// (\aboverulesep 0.4ex + \belowrulesep 0.65ex + the rule); the caption
// (\abovecaptionskip 10 pt plus its lines).
const (
	rowPt     = 11.0
	rulePt    = 5.0
	captionPt = 10.0
)

// rowHeight is the height of a body row in pt under layout l.
func (t *ttable) rowHeight(r trow, l layout) float64 {
	h := rowPt
	if r.group != "" {
		h = rowPt
	} else {
		for j, c := range r.cells {
			if j < len(l.wrapped) && l.wrapped[j] {
				h = max(h, rowPt*float64(lines(c, l.widths[j])))
			}
		}
	}
	if r.rule != "" {
		h += rulePt
	}
	return h
}

// headHeight is the height in pt of the caption, the header and the
// rules around it, with the caption set in width capW.
func (t *ttable) headHeight(capW float64, headLines int) float64 {
	capLines := math.Ceil((t.captionEm*texPt + 40) / capW) // "Table 12: " is about 40 pt
	h := captionPt + capLines*rowPt
	h += float64(len(t.head)+headLines-1)*rowPt + 2*rulePt + rulePt // top, mid, bottom rules
	for _, r := range t.headRules {
		if r != "" {
			h += rulePt
		}
	}
	return h
}

// height is the estimated height of the whole table in pt.
func (t *ttable) height(l layout, capW float64) float64 {
	h := t.headHeight(capW, l.headLines)
	for _, r := range t.rows {
		h += t.rowHeight(r, l)
	}
	return h
}

// colSpec returns the preamble entry of column j.
func (t *ttable) colSpec(j int, l layout) string {
	c := t.cols[j]
	var s string
	switch c.kind {
	case colNum:
		s = fmt.Sprintf("D{.}{.}{%d.%d}", l.nums[j].x, l.nums[j].y)
	case colSpread:
		s = ">{${}}l<{$}"
	default:
		if l.wrapped[j] {
			s = fmt.Sprintf(">{\\raggedright\\arraybackslash}p{%spt}", ptString(l.widths[j]))
		} else {
			s = "l"
		}
	}
	if j > 0 && c.joinPrev {
		s = "@{}" + s
	}
	return s
}

// roundUp rounds a width up to 0.1 pt, as written.
func roundUp(v float64) float64 { return math.Ceil(v*10-1e-9) / 10 }

func ptString(v float64) string {
	return strconv.FormatFloat(roundUp(v), 'f', 1, 64)
}

// preamble returns the tabular preamble.
func (t *ttable) preamble(l layout) string {
	var b strings.Builder
	b.WriteString("@{}")
	for j := range t.cols {
		b.WriteString(t.colSpec(j, l))
	}
	b.WriteString("@{}")
	return b.String()
}

// mcSpec returns the \multicolumn preamble for columns first..last
// (0-based, inclusive) keeping the column separation of the table: @{} at
// the outer edges and beside joined columns.
func (t *ttable) mcSpec(first, last int, align byte) string {
	var s string
	if first == 0 || t.cols[first].joinPrev {
		s = "@{}"
	}
	s += string(align)
	if last == len(t.cols)-1 || t.cols[last+1].joinPrev {
		s += "@{}"
	}
	return s
}

// cellTeX returns the TeX of body cell j under layout l.
func (t *ttable) cellTeX(c tcell, j int, l layout) string {
	col := t.cols[j]
	switch {
	case col.kind == colNum && c.text:
		return "\\multicolumn{1}{" + t.mcSpec(j, j, 'c') + "}{" + c.tex + "}"
	case col.kind == colNum:
		return numTeX(c.num, c.bold)
	case col.kind == colText && l.wrapped[j] && c.wrapTeX != "":
		return c.wrapTeX
	}
	return c.tex
}

// numTeX writes a number for a D column: bold digits as \mathbf on each
// side of the point (dcolumn splits the cell at the point, so the point
// itself stays in the regular weight).
func numTeX(s string, bold bool) string {
	s = strings.ReplaceAll(s, "<", "{<}")
	if !bold {
		return s
	}
	l, r, ok := splitDecimal(s)
	sign := ""
	if l != "" && (l[0] == '-' || l[0] == '+') {
		sign, l = l[:1], l[1:]
	}
	out := sign + "\\mathbf{" + l + "}"
	if ok {
		out += ".\\mathbf{" + r + "}"
	}
	return out
}

// headTeX writes header row hi.
func (t *ttable) headTeX(hi int, l layout) string {
	var parts []string
	j := 0
	for ci, c := range t.head[hi] {
		span := max(c.span, 1)
		align := c.align
		if align == 0 {
			align = 'c'
			if t.cols[j].kind == colText {
				align = 'l'
			}
		}
		tex := c.tex
		if lines, ok := l.stacks[[2]int{hi, ci}]; ok {
			tex = "\\begin{tabular}[b]{@{}" + string(align) + "@{}}" + strings.Join(lines, "\\\\") + "\\end{tabular}"
		}
		if span > 1 || t.cols[j].kind != colText {
			tex = "\\multicolumn{" + strconv.Itoa(span) + "}{" + t.mcSpec(j, j+span-1, align) + "}{" + tex + "}"
		}
		parts = append(parts, tex)
		j += span
	}
	return strings.Join(parts, " & ") + " \\\\\n"
}

// rowTeX writes body row r; star keeps it on the page of the next row.
func (t *ttable) rowTeX(r trow, l layout, star bool) string {
	end := " \\\\\n"
	if star {
		end = " \\\\*\n"
	}
	if r.group != "" {
		return "\\multicolumn{" + strconv.Itoa(len(t.cols)) + "}{@{}l@{}}{" + r.group + "}" + end
	}
	parts := make([]string, len(r.cells))
	for j, c := range r.cells {
		parts[j] = t.cellTeX(c, j, l)
	}
	return strings.Join(parts, " & ") + end
}

// header returns the header rows with their rules.
func (t *ttable) header(l layout) string {
	var b strings.Builder
	for i := range t.head {
		b.WriteString(t.headTeX(i, l))
		if i < len(t.headRules) && t.headRules[i] != "" {
			b.WriteString(t.headRules[i] + "\n")
		}
	}
	return b.String()
}

// body writes the rows; group header rows keep their first row with them.
func (t *ttable) body(rows []trow, l layout) string {
	var b strings.Builder
	for i, r := range rows {
		if r.rule != "" && i > 0 {
			b.WriteString(r.rule + "\n")
		}
		b.WriteString(t.rowTeX(r, l, r.group != ""))
	}
	return b.String()
}

// sepTeX sets \tabcolsep when it is not the default.
func sepTeX(l layout) string {
	if l.sep == 6 {
		return ""
	}
	return "\\setlength{\\tabcolsep}{" + strconv.FormatFloat(l.sep, 'f', -1, 64) + "pt}\n"
}

// emitFloat writes rows as one float (table or table*).
func (t *ttable) emitFloat(b *strings.Builder, env string, caption, key string, rows []trow, l layout) {
	place := "[htbp]"
	if env == "table*" {
		place = "[tbp]"
	}
	fmt.Fprintf(b, "\\begin{%s}%s\n\\centering\n\\small\n%s", env, place, sepTeX(l))
	fmt.Fprintf(b, "\\caption{%s}\n\\label{%s}\n", caption, key)
	fmt.Fprintf(b, "\\begin{tabular}{%s}\n\\toprule\n", t.preamble(l))
	b.WriteString(t.header(l))
	b.WriteString("\\midrule\n")
	b.WriteString(t.body(rows, l))
	fmt.Fprintf(b, "\\bottomrule\n\\end{tabular}\n\\end{%s}\n", env)
}

// emitLong writes the table as a longtable.
func (t *ttable) emitLong(b *strings.Builder, l layout) {
	n := strconv.Itoa(len(t.cols))
	fmt.Fprintf(b, "\\begingroup\n\\small\n%s", sepTeX(l))
	fmt.Fprintf(b, "\\begin{longtable}{%s}\n", t.preamble(l))
	fmt.Fprintf(b, "\\caption{%s}\\label{%s}\\\\\n\\toprule\n", t.caption, t.key)
	b.WriteString(t.header(l))
	b.WriteString("\\midrule\n\\endfirsthead\n")
	b.WriteString("\\caption[]{(continued)}\\\\\n\\toprule\n")
	b.WriteString(t.header(l))
	b.WriteString("\\midrule\n\\endhead\n")
	fmt.Fprintf(b, "\\midrule\n\\multicolumn{%s}{@{}r@{}}{\\emph{continued on the next page}}\\\\\n\\endfoot\n", n)
	b.WriteString("\\bottomrule\n\\endlastfoot\n")
	b.WriteString(t.body(t.rows, l))
	b.WriteString("\\end{longtable}\n\\endgroup\n")
}

// texTableInfo describes one table as written.
type texTableInfo = TeXTableInfo

// TeXTableInfo describes a table of summary.tex as written: its label,
// estimated width against the room of the layout, body rows, and how it
// runs over pages.
type TeXTableInfo struct {
	Label     string
	Width     float64 // estimated, pt
	Room      float64 // available width, pt
	Rows      int     // body rows, including group header rows
	LongTable bool
	Parts     int  // floats the table was split into (1 unless split for length)
	Wraps     bool // some names wrap
	Sep       float64
}

// emit writes t in the layout of opt and returns what it wrote.
func (t *ttable) emit(b *strings.Builder, opt ReportOptions, warn *[]string) TeXTableInfo {
	width, height := opt.size()
	l := t.fit(width, 0)
	info := TeXTableInfo{Label: t.key, Width: l.total, Room: width, Rows: len(t.rows), Parts: 1, Wraps: l.wraps, Sep: l.sep}
	if !l.fits {
		*warn = append(*warn, fmt.Sprintf("table %s is about %.0f pt wide, wider than the %.0f pt available: shorten the model labels (the `label` key of a [[model]]), show fewer metrics, datasets or models ([report] metrics, datasets, models), or choose the layout wide or landscape ([report] layout)", t.key, l.total, width))
	}
	capW := width
	tooLong := t.height(l, capW) > 0.97*height || (opt.LongTable > 0 && len(t.rows) > opt.LongTable)
	env := "table"
	if opt.Layout == LayoutWide {
		env = "table*"
	}
	switch {
	case !tooLong:
		t.emitFloat(b, env, t.caption, t.key, t.rows, l)
	case !opt.Layout.floats():
		info.LongTable = true
		t.emitLong(b, l)
	default:
		parts := t.splitRows(l, capW, height, opt.LongTable)
		info.Parts = len(parts)
		for i, rows := range parts {
			if i > 0 {
				b.WriteString("\n")
			}
			caption, key := t.caption, t.key
			if i > 0 {
				caption = fmt.Sprintf("Table~\\ref{%s}, continued (part %d of %d).", t.key, i+1, len(parts))
				key = t.key + "-" + strconv.Itoa(i+1)
			}
			t.emitFloat(b, env, caption, key, rows, l)
		}
	}
	return info
}

// splitRows cuts the body into parts that each fit one float: whole units
// (datasets) while they fit, a unit longer than a page cut at row
// boundaries (its group header repeated, marked "continued").
func (t *ttable) splitRows(l layout, capW, height float64, maxRows int) [][]trow {
	// Continuation parts have a one-line caption.
	// 3% of the page is kept free for what the estimate misses.
	room := func(first bool) float64 {
		if first {
			return 0.97*height - t.headHeight(capW, l.headLines)
		}
		return 0.97*height - (captionPt + 2*rowPt + float64(len(t.head)+l.headLines-1)*rowPt + 3*rulePt)
	}
	var parts [][]trow
	var cur []trow
	var used float64
	count := 0
	full := func(h float64) bool {
		return used+h > room(len(parts) == 0) || (maxRows > 0 && count+1 > maxRows)
	}
	var lastGroup trow
	for i, r := range t.rows {
		if r.group != "" {
			lastGroup = r
			// Keep a group header with its unit when the unit fits.
			unitH := 0.0
			for _, u := range t.rows[i:] {
				if u.unit != r.unit {
					break
				}
				unitH += t.rowHeight(u, l)
			}
			// A group starts a new part unless it fits whole or with at
			// least its header and three rows.
			if len(cur) > 0 && full(min(unitH, t.rowHeight(r, l)+3*rowPt)) {
				parts = append(parts, cur)
				cur, used, count = nil, 0, 0
			}
		}
		h := t.rowHeight(r, l)
		if len(cur) > 0 && full(h) {
			parts = append(parts, cur)
			cur, used, count = nil, 0, 0
			if r.group == "" && lastGroup.group != "" && lastGroup.unit == r.unit {
				cont := lastGroup
				cont.group = lastGroup.group + " (continued)"
				cur = append(cur, cont)
				used += t.rowHeight(cont, l)
				count++
			}
		}
		if len(cur) == 0 || (len(cur) == 1 && cur[0].group != "") {
			r = t.carry(r, i)
		}
		cur = append(cur, r)
		used += h
		count++
	}
	if len(cur) > 0 {
		parts = append(parts, cur)
	}
	return parts
}

// carry fills the empty leading text cells of row i (a pipeline shown on
// the first row of its group only) from the rows above, for a row that
// opens a part of a split table.
func (t *ttable) carry(r trow, i int) trow {
	if r.group != "" || len(r.cells) == 0 || r.cells[0].tex != "" {
		return r
	}
	for k := i - 1; k >= 0; k-- {
		u := t.rows[k]
		if u.group != "" {
			break
		}
		if len(u.cells) > 0 && u.cells[0].tex != "" {
			cells := append([]tcell(nil), r.cells...)
			cells[0] = u.cells[0]
			r.cells = cells
			return r
		}
	}
	return r
}
