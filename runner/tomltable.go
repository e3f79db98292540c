package runner

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"time"
)

// loader collects the problems of one project file.
type loader struct {
	file  string
	lines keyLines
	errs  ProjectErrors
	// defaulted lists the key paths that took their default value.
	defaulted []string
}

func (l *loader) errorf(path, hint, format string, args ...any) {
	l.errs = append(l.errs, &ProjectError{
		File: l.file, Line: l.lines.line(path), Key: path,
		Msg: fmt.Sprintf(format, args...), Hint: hint,
	})
}

// table is one TOML table being read: the keys read so far are remembered,
// so that every other key can be reported as unknown.
type table struct {
	l    *loader
	path string
	m    map[string]any
	read map[string]bool
}

func (l *loader) newTable(path string, m map[string]any) *table {
	return &table{l: l, path: path, m: m, read: map[string]bool{}}
}

func (t *table) key(k string) string {
	if t.path == "" {
		return k
	}
	return t.path + "." + k
}

// get returns the raw value of key k and marks it read.
func (t *table) get(k string) (any, bool) {
	t.read[k] = true
	v, ok := t.m[k]
	return v, ok
}

// defaulted records that key k took its default.
// absent reports whether the table has no key k at all (a key of the wrong
// type is present, and its getter has already reported it).
func (t *table) absent(k string) bool {
	_, ok := t.m[k]
	return !ok
}

func (t *table) defaulted(k string) { t.l.defaulted = append(t.l.defaulted, t.key(k)) }

func tomlType(v any) string {
	switch v.(type) {
	case string:
		return "a string"
	case int64:
		return "an integer"
	case float64:
		return "a float"
	case bool:
		return "a boolean"
	case []any:
		return "an array"
	case []map[string]any:
		return "an array of tables"
	case map[string]any:
		return "a table"
	case time.Time:
		return "a date-time"
	}
	return fmt.Sprintf("a %T", v)
}

func (t *table) wrongType(k string, v any, want string) {
	t.l.errorf(t.key(k), typeHint(k, v, want), "is %s; it must be %s", tomlType(v), want)
}

// keyExamples are example values of the project file's keys, by the key's
// last name, as its wrong-type hints show them.
var keyExamples = map[string]string{
	"name": `"seal-life"`, "description": `"Seal life for the 2026 asset review"`,
	"seed": "20261202", "criterion": `"aicc"`, "confidence": "0.95", "intervals": `"profile"`,
	"bootstrap": "999", "tolerance": "1e-10", "max_iterations": "2000", "require_clean_git": "false",
	"file": `"data/seal_life.csv"`, "column": `"hours"`, "units": `"h"`, "delimiter": `";"`,
	"status_column": `"state"`, "left": `["<"]`, "right": `["+", "suspended"]`,
	"lower_column": `"lo"`, "upper_column": `"hi"`, "trials_column": `"n"`, "split_by": `"well"`,
	"equals": `"north"`, "missing": `["", "NA"]`, "families": `["weibull", "lognormal"]`,
	"dataset": `"seal-life"`, "candidates": `"lifetime"`, "quantiles": "[0.1, 0.5]",
	"return_periods": "[10, 100]", "thresholds": "[5000.0]", "pdf": "true", "figures": "true",
	"tables": `["md", "tex"]`, "templates": `"my-templates"`, "threshold": "30.0",
}

// typeWords says how a value of each wanted type is written in TOML.
var typeWords = map[string]string{
	"a string":            "write it in double quotes",
	"a number":            "write it as a number, without quotes",
	"an integer":          "write it as a whole number, without quotes or a decimal point",
	"true or false":       "write true or false, without quotes",
	"an array of strings": "write a list of quoted texts in brackets",
	"an array of numbers": "write a list of numbers in brackets",
	"a table":             "write it as an inline table { … } or a [section]",
}

// typeHint says how to write key k's value v, which is not of the wanted
// type: "remove the quotes" where v is the wanted value quoted
// (bootstrap = "999"), else how such a value is written, with an example
// where the key has one (bootstrap = 999).
func typeHint(k string, v any, want string) string {
	if s, ok := v.(string); ok {
		quoted := false
		switch want {
		case "an integer":
			_, err := strconv.ParseInt(s, 10, 64)
			quoted = err == nil
		case "a number":
			x, err := strconv.ParseFloat(s, 64)
			quoted = err == nil && !math.IsNaN(x) && !math.IsInf(x, 0)
		case "true or false":
			quoted = s == "true" || s == "false"
		}
		if quoted {
			return fmt.Sprintf("remove the quotes: %s = %s", k, s)
		}
	}
	hint, ok := typeWords[want]
	if !ok {
		return ""
	}
	return withExample(k, hint)
}

// str reads a string key; ok is false when it is absent or of another type.
func (t *table) str(k string) (string, bool) {
	v, ok := t.get(k)
	if !ok {
		return "", false
	}
	s, ok := v.(string)
	if !ok {
		t.wrongType(k, v, "a string")
	}
	return s, ok
}

// number reads a float key; integers are accepted.
func (t *table) number(k string) (float64, bool) {
	v, ok := t.get(k)
	if !ok {
		return 0, false
	}
	x, ok := asNumber(v)
	if !ok {
		t.wrongType(k, v, "a number")
	}
	return x, ok
}

func asNumber(v any) (float64, bool) {
	switch x := v.(type) {
	case float64:
		return x, true
	case int64:
		return float64(x), true
	}
	return 0, false
}

// integer reads an integer key.
func (t *table) integer(k string) (int64, bool) {
	v, ok := t.get(k)
	if !ok {
		return 0, false
	}
	switch x := v.(type) {
	case int64:
		return x, true
	case float64:
		if x == math.Trunc(x) && math.Abs(x) < 1<<53 {
			return int64(x), true
		}
	}
	t.wrongType(k, v, "an integer")
	return 0, false
}

func (t *table) boolean(k string) (bool, bool) {
	v, ok := t.get(k)
	if !ok {
		return false, false
	}
	b, ok := v.(bool)
	if !ok {
		t.wrongType(k, v, "true or false")
	}
	return b, ok
}

// strings reads an array of strings.
func (t *table) strings(k string) ([]string, bool) {
	v, ok := t.get(k)
	if !ok {
		return nil, false
	}
	arr, ok := v.([]any)
	if !ok {
		t.wrongType(k, v, "an array of strings")
		return nil, false
	}
	out := make([]string, 0, len(arr))
	for i, e := range arr {
		s, ok := e.(string)
		if !ok {
			t.l.errorf(t.key(k)+"["+strconv.Itoa(i)+"]", withExample(k, "write each element in double quotes"), "is %s; it must be a string", tomlType(e))
			return nil, false
		}
		out = append(out, s)
	}
	return out, true
}

// numbers reads an array of numbers (integers accepted).
func (t *table) numbers(k string) ([]float64, bool) {
	v, ok := t.get(k)
	if !ok {
		return nil, false
	}
	arr, ok := v.([]any)
	if !ok {
		t.wrongType(k, v, "an array of numbers")
		return nil, false
	}
	out := make([]float64, 0, len(arr))
	for i, e := range arr {
		x, ok := asNumber(e)
		if !ok {
			t.l.errorf(t.key(k)+"["+strconv.Itoa(i)+"]", withExample(k, "write each element as a number, without quotes"), "is %s; it must be a number", tomlType(e))
			return nil, false
		}
		out = append(out, x)
	}
	return out, true
}

// withExample is hint followed by key k's example value, where it has one.
func withExample(k, hint string) string {
	if ex, ok := keyExamples[k]; ok {
		hint += fmt.Sprintf(", e.g. %s = %s", k, ex)
	}
	return hint
}

// sub reads a table key (a [header] table or an inline table).
func (t *table) sub(k string) (*table, bool) {
	v, ok := t.get(k)
	if !ok {
		return nil, false
	}
	m, ok := v.(map[string]any)
	if !ok {
		t.wrongType(k, v, "a table")
		return nil, false
	}
	return t.l.newTable(t.key(k), m), true
}

// tables reads an array of tables ([[k]]).
func (t *table) tables(k string) []*table {
	v, ok := t.get(k)
	if !ok {
		return nil
	}
	var ms []map[string]any
	switch x := v.(type) {
	case []map[string]any:
		ms = x
	case []any:
		for i, e := range x {
			m, ok := e.(map[string]any)
			if !ok {
				t.l.errorf(t.key(k)+"["+strconv.Itoa(i)+"]", "write each as a [["+k+"]] table", "is %s; it must be a table", tomlType(e))
				return nil
			}
			ms = append(ms, m)
		}
	default:
		t.wrongType(k, v, "an array of tables, written [["+k+"]]")
		return nil
	}
	out := make([]*table, len(ms))
	for i, m := range ms {
		out[i] = t.l.newTable(t.key(k)+"["+strconv.Itoa(i)+"]", m)
	}
	return out
}

// done reports every key of t that was never read as unknown, with the
// closest known key (every key the caller asked for) as a hint.
func (t *table) done() {
	known := make([]string, 0, len(t.read))
	for k := range t.read {
		known = append(known, k)
	}
	sort.Strings(known)
	var unknown []string
	for k := range t.m {
		if _, asked := t.read[k]; !asked {
			unknown = append(unknown, k)
		}
	}
	sort.Slice(unknown, func(i, j int) bool {
		li, lj := t.l.lines.line(t.key(unknown[i])), t.l.lines.line(t.key(unknown[j]))
		if li != lj {
			return li < lj
		}
		return unknown[i] < unknown[j]
	})
	for _, k := range unknown {
		hint := didYouMean(k, known)
		if hint == "" {
			where := "the top level"
			if t.path != "" {
				where = t.path
			}
			hint = fmt.Sprintf("the keys of %s are: %s", where, joinQuoted(known))
		}
		t.l.errorf(t.key(k), hint, "unknown key")
	}
}

func joinQuoted(s []string) string {
	out := ""
	for i, x := range s {
		if i > 0 {
			out += ", "
		}
		out += x
	}
	return out
}
