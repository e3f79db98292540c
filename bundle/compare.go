package bundle

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
)

// Difference is one cell or value that differs between two versions of a
// result file: Row and RowB are the 1-based data rows (header excluded) of
// the first and the second version (0 where the row is not in that version),
// Key names the row by its key columns, Column the column (or the JSON path
// inside results.json; "(row)" for a row that only one version has).
type Difference struct {
	Member    string
	Row, RowB int
	Key       string
	Column    string
	A, B      string
}

// Describe says where the difference is and both values, with labels for
// the two versions (e.g. "recorded", "recomputed"). A row that moved is
// given by its number in each version; a row in one version only is said
// to be so, not given as a cell.
func (d Difference) Describe(la, lb string) string {
	key := ""
	if d.Key != "" {
		key = " (" + d.Key + ")"
	}
	switch {
	case d.Column == "(row)" && d.Row > 0 && d.RowB == 0:
		return fmt.Sprintf("row %d%s of %s: not in %s", d.Row, key, la, lb)
	case d.Column == "(row)" && d.Row == 0 && d.RowB > 0:
		return fmt.Sprintf("row %d%s of %s: not in %s", d.RowB, key, lb, la)
	}
	where := ""
	switch {
	case d.Row > 0 && d.RowB > 0 && d.Row != d.RowB:
		where = fmt.Sprintf("row %d in %s, %d in %s%s, ", d.Row, la, d.RowB, lb, key)
	case d.Row > 0:
		where = fmt.Sprintf("row %d%s, ", d.Row, key)
	}
	return fmt.Sprintf("%scolumn %s: %s %s, %s %s", where, d.Column, la, show(d.A), lb, show(d.B))
}

func show(s string) string {
	if s == "" {
		return "(empty)"
	}
	return s
}

// Agree decides whether two numbers of one cell agree; fields are the row's
// other cells by column name (for rules that depend on the interval method
// or the replicate count). Exact equality is the default.
type Agree func(column string, fields map[string]string, a, b float64) bool

// resultKeys are the columns that name a row of each result table.
var resultKeys = map[string][]string{
	"fits.csv":       {"analysis", "family"},
	"parameters.csv": {"analysis", "family", "parameter"},
	"derived.csv":    {"analysis", "family", "quantity", "argument"},
	"gof.csv":        {"analysis", "family", "statistic"},
}

// CompareCSV compares two versions of a result table cell by cell, rows
// matched by their key columns (by position for an unknown table), numbers
// by agree (nil: exactly, as parsed float64), text exactly. A row in one
// version only is a difference whose column is "(row)", with the row number
// of the version that has it.
func CompareCSV(member string, a, b []byte, agree Agree) ([]Difference, int, error) {
	return compareCSV(member, a, b, agree, nil)
}

// compareCSV is CompareCSV where the text cells of the columns skipText
// accepts are not compared (nil: every text is compared).
func compareCSV(member string, a, b []byte, agree Agree, skipText func(column string) bool) ([]Difference, int, error) {
	if bytes.Equal(a, b) {
		n, err := identicalCSV(member, a)
		return nil, n, err
	}
	ra, err := csv.NewReader(bytes.NewReader(a)).ReadAll()
	if err != nil {
		return nil, 0, fmt.Errorf("%s: %w", member, err)
	}
	rb, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
	if err != nil {
		return nil, 0, fmt.Errorf("%s: %w", member, err)
	}
	if len(ra) == 0 || len(rb) == 0 {
		return nil, 0, fmt.Errorf("%s: no header row", member)
	}
	ha, hb := ra[0], rb[0]
	var diffs []Difference
	if strings.Join(ha, ",") != strings.Join(hb, ",") {
		diffs = append(diffs, Difference{Member: member, Column: "(header)", A: strings.Join(ha, ","), B: strings.Join(hb, ",")})
		return diffs, 0, nil
	}
	base := member[strings.LastIndex(member, "/")+1:]
	keyCols := resultKeys[base]
	keyOf := func(row []string, i int) string {
		if keyCols == nil {
			return "#" + strconv.Itoa(i)
		}
		parts := make([]string, 0, len(keyCols))
		for _, k := range keyCols {
			for c, h := range ha {
				if h == k && c < len(row) {
					parts = append(parts, k+"="+row[c])
				}
			}
		}
		return strings.Join(parts, ", ")
	}
	indexB := map[string]int{}
	for i := 1; i < len(rb); i++ {
		k := keyOf(rb[i], i)
		if _, dup := indexB[k]; !dup {
			indexB[k] = i
		}
	}
	seenB := map[int]bool{}
	compared := 0
	for i := 1; i < len(ra); i++ {
		k := keyOf(ra[i], i)
		j, ok := indexB[k]
		if !ok || seenB[j] {
			diffs = append(diffs, Difference{Member: member, Row: i, Key: k, Column: "(row)", A: "present", B: "absent"})
			continue
		}
		seenB[j] = true
		fields := map[string]string{}
		for c, h := range ha {
			if c < len(ra[i]) {
				fields[h] = ra[i][c]
			}
		}
		for c, h := range ha {
			va, vb := cell(ra[i], c), cell(rb[j], c)
			fa, ea := strconv.ParseFloat(va, 64)
			fb, eb := strconv.ParseFloat(vb, 64)
			if ea == nil && eb == nil {
				compared++
				if fa == fb || (agree != nil && agree(h, fields, fa, fb)) {
					continue
				}
			} else if va == vb || (skipText != nil && skipText(h)) {
				continue
			}
			diffs = append(diffs, Difference{Member: member, Row: i, RowB: j, Key: k, Column: h, A: va, B: vb})
		}
	}
	for j := 1; j < len(rb); j++ {
		if !seenB[j] {
			diffs = append(diffs, Difference{Member: member, RowB: j, Key: keyOf(rb[j], j), Column: "(row)", A: "absent", B: "present"})
		}
	}
	return diffs, compared, nil
}

// identicalCSV is what compareCSV finds for two identical versions, a:
// no difference, and the count of numbers compared (the cells of the data
// rows that parse as float64), or the error that reading a gives. Rows
// that repeat a key are matched to themselves here; the comparison row by
// row would report them, which a table fitseal writes never holds.
func identicalCSV(member string, a []byte) (int, error) {
	r := csv.NewReader(bytes.NewReader(a))
	r.ReuseRecord = true
	rows, numbers := 0, 0
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return 0, fmt.Errorf("%s: %w", member, err)
		}
		if rows++; rows == 1 {
			continue // the header
		}
		for _, v := range rec {
			if _, err := strconv.ParseFloat(v, 64); err == nil {
				numbers++
			}
		}
	}
	if rows == 0 {
		return 0, fmt.Errorf("%s: no header row", member)
	}
	return numbers, nil
}

func cell(row []string, c int) string {
	if c < len(row) {
		return row[c]
	}
	return ""
}

// CompareJSON compares two JSON documents value by value; Column is the
// value's path (e.g. analyses[0].fits[2].loglik). Numbers are compared by
// agree with the sibling values of their object as fields.
func CompareJSON(member string, a, b []byte, agree Agree) ([]Difference, int, error) {
	return compareJSON(member, a, b, agree, nil)
}

// compareJSON is CompareJSON where text values whose path skipText accepts
// are not compared (nil: every text is compared).
func compareJSON(member string, a, b []byte, agree Agree, skipText func(path string) bool) ([]Difference, int, error) {
	if bytes.Equal(a, b) && json.Valid(a) {
		return nil, jsonNumbers(a), nil
	}
	va, err := decodeJSON(a)
	if err != nil {
		return nil, 0, fmt.Errorf("%s: %w", member, err)
	}
	vb, err := decodeJSON(b)
	if err != nil {
		return nil, 0, fmt.Errorf("%s: %w", member, err)
	}
	c := &jsonCompare{member: member, agree: agree, skipText: skipText}
	c.walk("", va, vb, nil)
	return c.diffs, c.compared, nil
}

func decodeJSON(b []byte) (any, error) {
	d := json.NewDecoder(bytes.NewReader(b))
	d.UseNumber()
	var v any
	if err := d.Decode(&v); err != nil {
		return nil, err
	}
	return v, nil
}

// jsonNumbers counts the numbers of the valid JSON text b: the tokens
// outside strings that begin with a minus sign or a digit (RFC 8259,
// section 6), each a value that compareJSON compares.
func jsonNumbers(b []byte) int {
	n := 0
	for i := 0; i < len(b); i++ {
		switch c := b[i]; {
		case c == '"':
			for i++; i < len(b) && b[i] != '"'; i++ {
				if b[i] == '\\' {
					i++ // the escaped character, which may be a quote
				}
			}
		case c == '-' || '0' <= c && c <= '9':
			n++
			for i+1 < len(b) && isNumberByte(b[i+1]) {
				i++
			}
		}
	}
	return n
}

// isNumberByte reports whether c can continue a JSON number.
func isNumberByte(c byte) bool {
	return '0' <= c && c <= '9' || c == '.' || c == 'e' || c == 'E' || c == '+' || c == '-'
}

type jsonCompare struct {
	member   string
	agree    Agree
	skipText func(path string) bool
	diffs    []Difference
	compared int
}

func (c *jsonCompare) add(path string, a, b any) {
	c.diffs = append(c.diffs, Difference{Member: c.member, Column: path, A: jsonText(a), B: jsonText(b)})
}

func jsonText(v any) string {
	if v == nil {
		return "null"
	}
	if _, ok := v.(absentValue); ok {
		return "(absent)"
	}
	if s, ok := v.(string); ok {
		return strconv.Quote(s)
	}
	b, _ := json.Marshal(v)
	if len(b) > 80 {
		return string(b[:77]) + "…"
	}
	return string(b)
}

func (c *jsonCompare) walk(path string, a, b any, fields map[string]string) {
	switch x := a.(type) {
	case map[string]any:
		y, ok := b.(map[string]any)
		if !ok {
			c.add(path, a, b)
			return
		}
		sib := map[string]string{}
		for k, v := range x {
			switch t := v.(type) {
			case string:
				sib[k] = t
			case json.Number:
				sib[k] = t.String()
			}
		}
		keys := make([]string, 0, len(x)+len(y))
		for k := range x {
			keys = append(keys, k)
		}
		for k := range y {
			if _, ok := x[k]; !ok {
				keys = append(keys, k)
			}
		}
		sort.Strings(keys)
		for _, k := range keys {
			p := k
			if path != "" {
				p = path + "." + k
			}
			va, okA := x[k]
			vb, okB := y[k]
			if !okA || !okB {
				c.add(p, presence(okA, va), presence(okB, vb))
				continue
			}
			c.walk(p, va, vb, sib)
		}
	case []any:
		y, ok := b.([]any)
		if !ok {
			c.add(path, a, b)
			return
		}
		// Elements pair up by position unless they name different things
		// there (as when one dataset of a project replaces another).
		ix, iy, named := identities(x, y)
		if len(x) == len(y) && (!named || slices.Equal(ix, iy)) {
			for i := range x {
				c.walk(fmt.Sprintf("%s[%d]", path, i), x[i], y[i], fields)
			}
			return
		}
		c.walkUnaligned(path, x, y, ix, iy, named, fields)
	case json.Number:
		y, ok := b.(json.Number)
		if !ok {
			c.add(path, a, b)
			return
		}
		c.compared++
		fa, ea := x.Float64()
		fb, eb := y.Float64()
		if ea != nil || eb != nil {
			if x != y {
				c.add(path, a, b)
			}
			return
		}
		if fa == fb {
			return
		}
		col := path[strings.LastIndex(path, ".")+1:]
		if c.agree != nil && c.agree(col, fields, fa, fb) {
			return
		}
		c.add(path, a, b)
	default:
		if a != b {
			if _, text := a.(string); text && c.skipText != nil && c.skipText(path) {
				if _, text := b.(string); text {
					return
				}
			}
			c.add(path, a, b)
		}
	}
}

// identityKeys are the members that together name an element of an array
// of objects (a dataset, an analysis, a fit, a parameter, a derived
// quantity, a statistic, an input file, a seed), in the order tried.
var identityKeys = [][]string{
	{"name"},
	{"family", "quantity", "argument"},
	{"family", "statistic"},
	{"analysis", "family", "purpose"},
	{"analysis", "family"},
	{"family"},
	{"path"},
}

// identities returns, for the first identity keys (see [identityKeys])
// that name every element of x and of y apart, each element's values of
// them, as "name=x" or "family=x, statistic=y"; ok is false where no keys
// do (elements that are not objects, or repeat their values).
func identities(x, y []any) (idx, idy []string, ok bool) {
	for _, keys := range identityKeys {
		idx, idy = identitiesBy(keys, x), identitiesBy(keys, y)
		if idx != nil && idy != nil {
			return idx, idy, true
		}
	}
	return nil, nil, false
}

// identitiesBy is each element's values of keys, or nil unless every
// element of list (at least one) has text or number values of them that
// no other element shares.
func identitiesBy(keys []string, list []any) []string {
	if len(list) == 0 {
		return nil
	}
	ids := make([]string, 0, len(list))
	seen := map[string]bool{}
	for _, e := range list {
		o, isObj := e.(map[string]any)
		if !isObj {
			return nil
		}
		parts := make([]string, 0, len(keys))
		for _, k := range keys {
			switch v := o[k].(type) {
			case string:
				parts = append(parts, k+"="+v)
			case json.Number:
				parts = append(parts, k+"="+v.String())
			}
		}
		id := strings.Join(parts, ", ")
		if len(parts) != len(keys) || seen[id] {
			return nil
		}
		seen[id] = true
		ids = append(ids, id)
	}
	return ids
}

// distinctTexts returns the elements of list as a set when every one is a
// text and no text repeats, else nil.
func distinctTexts(list []any) map[string]struct{} {
	set := make(map[string]struct{}, len(list))
	for _, e := range list {
		t, ok := e.(string)
		if !ok {
			return nil
		}
		if _, dup := set[t]; dup {
			return nil
		}
		set[t] = struct{}{}
	}
	return set
}

// walkUnaligned compares two arrays whose elements do not pair up by
// position: elements named by the same identity (see [identities]) are
// compared with each other, the rest listed as absent from one side, so that
// an added dataset is reported as that dataset and not as two long arrays
// that differ somewhere. Lists of distinct texts (family names, the settings
// left at their defaults) are compared as sets: each text of one side only is
// listed at its index there. Other arrays are compared position by position,
// and the elements past the shorter one listed as absent. ix, iy and named
// are identities(x, y), which the caller has taken.
func (c *jsonCompare) walkUnaligned(path string, x, y []any, ix, iy []string, named bool, fields map[string]string) {
	if sx, sy := distinctTexts(x), distinctTexts(y); sx != nil && sy != nil {
		for i, v := range x {
			if _, ok := sy[v.(string)]; !ok {
				c.add(fmt.Sprintf("%s[%d]", path, i), v, absentValue{})
			}
		}
		for j, v := range y {
			if _, ok := sx[v.(string)]; !ok {
				c.add(fmt.Sprintf("%s[%d]", path, j), absentValue{}, v)
			}
		}
		return
	}
	if !named {
		n := min(len(x), len(y))
		for i := 0; i < n; i++ {
			c.walk(fmt.Sprintf("%s[%d]", path, i), x[i], y[i], fields)
		}
		for i := n; i < len(x); i++ {
			c.add(fmt.Sprintf("%s[%d]", path, i), x[i], absentValue{})
		}
		for i := n; i < len(y); i++ {
			c.add(fmt.Sprintf("%s[%d]", path, i), absentValue{}, y[i])
		}
		return
	}
	inY := make(map[string]int, len(iy))
	for j, id := range iy {
		inY[id] = j
	}
	inX := make(map[string]bool, len(ix))
	for i, id := range ix {
		inX[id] = true
		p := fmt.Sprintf("%s[%s]", path, id)
		if j, ok := inY[id]; ok {
			c.walk(p, x[i], y[j], fields)
		} else {
			c.add(p, x[i], absentValue{})
		}
	}
	for j, id := range iy {
		if !inX[id] {
			c.add(fmt.Sprintf("%s[%s]", path, id), absentValue{}, y[j])
		}
	}
}

// absentValue stands for a value missing from one side; it shows as
// (absent), unquoted, unlike a text value.
type absentValue struct{}

func presence(ok bool, v any) any {
	if !ok {
		return absentValue{}
	}
	return v
}

// relClose reports |a − b| ≤ tol·max(|a|, |b|).
func relClose(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol*math.Max(math.Abs(a), math.Abs(b))
}
