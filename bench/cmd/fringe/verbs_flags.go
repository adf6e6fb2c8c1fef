package main

import (
	"flag"
	"fmt"
	"sort"
	"strings"
)

// flagError turns an error of flag.FlagSet.Parse into one usage message,
// prefixed with the verb once (main adds "fringe: "), with a hint naming
// the right flag when an unknown one is close to a defined one.
func flagError(fs *flag.FlagSet, err error) error {
	verb := strings.TrimPrefix(fs.Name(), "fringe ")
	msg := err.Error()
	if name, ok := strings.CutPrefix(msg, "flag provided but not defined: "); ok {
		name = strings.TrimLeft(name, "-")
		return usagef("%s: unknown flag -%s%s (see 'fringe %s -h')", verb, name, flagHint(fs, name), verb)
	}
	return usagef("%s: %s (see 'fringe %s -h')", verb, msg, verb)
}

// flagAliases are spellings people guess for a verb's flags (other tools'
// habits, singular and plural), mapped to fringe's; a hint is given only
// when the verb defines the target.
var flagAliases = map[string][]string{
	"o":          {"out"},
	"output":     {"out"},
	"outdir":     {"out"},
	"dir":        {"out"},
	"j":          {"workers"},
	"jobs":       {"workers"},
	"threads":    {"workers"},
	"procs":      {"workers"},
	"parallel":   {"workers"},
	"q":          {"quiet"},
	"silent":     {"quiet"},
	"y":          {"yes"},
	"force":      {"yes"},
	"data":       {"datasets", "dataset"},
	"d":          {"datasets", "dataset"},
	"pipe":       {"pipelines", "pipeline"},
	"p":          {"pipelines", "pipeline"},
	"preprocess": {"pipelines", "pipeline"},
	"k":          {"folds"},
	"cv":         {"folds"},
	"restart":    {"fresh"},
}

// flagNotes explain an unknown flag that is not a typo: the setting lives
// elsewhere. Used when the verb does not define the flag.
var flagNotes = map[string]string{
	"version":   "; the version is printed by 'fringe version' or 'fringe -version'",
	"seed":      "; the seed of a run is the spec's seed key",
	"datasets":  "; a run's datasets are the spec's datasets key",
	"dataset":   "; a run's datasets are the spec's datasets key",
	"pipelines": "; a run's pipelines are the spec's pipelines key",
	"pipeline":  "; a run's pipelines are the spec's pipelines key",
	"spec":      "; give the spec file as an argument",
	"folds":     "; the folds of a run are the spec's [cv] folds key",
	"resume":    "; a stopped run resumes by itself when the same command is started again (-fresh discards it instead)",
}

// flagHint suggests the flag meant by the unknown name: a known alias, a
// unique prefix, or the closest defined flag within an edit distance of
// one for short names and a third of the length for longer ones (Damerau–
// Levenshtein, optimal string alignment). It returns "" without a
// suggestion.
func flagHint(fs *flag.FlagSet, name string) string {
	var defined []string
	fs.VisitAll(func(f *flag.Flag) { defined = append(defined, f.Name) })
	sort.Strings(defined)
	has := func(n string) bool {
		i := sort.SearchStrings(defined, n)
		return i < len(defined) && defined[i] == n
	}
	lower := strings.ToLower(name)
	if lower != name && has(lower) {
		return fmt.Sprintf("; did you mean -%s?", lower)
	}
	for _, a := range flagAliases[lower] {
		if has(a) {
			return fmt.Sprintf("; did you mean -%s?", a)
		}
	}
	var prefixed []string
	for _, d := range defined {
		if len(lower) >= 2 && strings.HasPrefix(d, lower) {
			prefixed = append(prefixed, d)
		}
	}
	if len(prefixed) == 1 {
		return fmt.Sprintf("; did you mean -%s?", prefixed[0])
	}
	limit := max(1, len(lower)/3)
	best, bestD := "", limit+1
	for _, d := range defined {
		if dist := editDistance(lower, d); dist < bestD {
			best, bestD = d, dist
		}
	}
	if best != "" {
		return fmt.Sprintf("; did you mean -%s?", best)
	}
	if len(prefixed) > 1 {
		return fmt.Sprintf("; did you mean one of -%s?", strings.Join(prefixed, ", -"))
	}
	return flagNotes[lower]
}

// editDistance is the optimal-string-alignment distance of a and b: the
// fewest insertions, deletions, substitutions and swaps of adjacent
// letters that turn a into b (Damerau 1964; bytes, which flag names are).
func editDistance(a, b string) int {
	prev2 := make([]int, len(b)+1)
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
			if i > 1 && j > 1 && a[i-1] == b[j-2] && a[i-2] == b[j-1] {
				cur[j] = min(cur[j], prev2[j-2]+1)
			}
		}
		prev2, prev, cur = prev, cur, prev2
	}
	return prev[len(b)]
}
