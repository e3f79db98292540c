package runner

import (
	"strconv"
	"strings"
)

// keyLines finds the line of each key of a TOML file, by key path in the
// form the project errors use ("dataset[1].column"). The TOML decoder keeps
// key positions to itself (and without array indices), so this small scanner
// reads the headers and `key =` lines again. It is only used to point at a
// line in error messages: a key it cannot place gets line 0, never a wrong
// decision about the project.
type keyLines map[string]int

func scanKeyLines(src []byte) keyLines {
	lines := keyLines{}
	counts := map[string]int{} // array-of-tables path → elements seen so far
	prefix := ""
	depth := 0      // brackets and braces still open from a value on earlier lines
	multiline := "" // the delimiter of an open multi-line string
	resolve := func(segs []string, last bool) string {
		path := ""
		for j, s := range segs {
			if path != "" {
				path += "."
			}
			path += s
			if j == len(segs)-1 && last {
				break
			}
			if n, ok := counts[path]; ok && n > 0 {
				path += "[" + strconv.Itoa(n-1) + "]"
			}
		}
		return path
	}
	for i, raw := range strings.Split(string(src), "\n") {
		lineNo := i + 1
		s := raw
		if multiline != "" {
			k := strings.Index(s, multiline)
			if k < 0 {
				continue
			}
			s = s[k+3:]
			multiline = ""
			depth += bracketDelta(s)
			continue
		}
		if depth > 0 {
			depth += bracketDelta(s)
			if depth < 0 {
				depth = 0
			}
			continue
		}
		t := strings.TrimSpace(s)
		switch {
		case t == "" || t[0] == '#':
			continue
		case strings.HasPrefix(t, "[["):
			end := strings.Index(t, "]]")
			if end < 0 {
				continue
			}
			segs := splitDottedKey(t[2:end])
			base := resolve(segs, true)
			n := counts[base]
			counts[base] = n + 1
			prefix = base + "[" + strconv.Itoa(n) + "]"
			if _, ok := lines[prefix]; !ok {
				lines[prefix] = lineNo
			}
			if _, ok := lines[base]; !ok {
				lines[base] = lineNo
			}
			continue
		case t[0] == '[':
			end := strings.Index(t, "]")
			if end < 0 {
				continue
			}
			prefix = resolve(splitDottedKey(t[1:end]), false)
			if _, ok := lines[prefix]; !ok {
				lines[prefix] = lineNo
			}
			continue
		}
		eq := keyEnd(t)
		if eq < 0 {
			continue
		}
		key := strings.Join(splitDottedKey(t[:eq]), ".")
		path := key
		if prefix != "" {
			path = prefix + "." + key
		}
		if _, ok := lines[path]; !ok {
			lines[path] = lineNo
		}
		value := t[eq+1:]
		for _, d := range []string{`"""`, `'''`} {
			if strings.Count(value, d)%2 == 1 {
				multiline = d
			}
		}
		if multiline == "" {
			depth = max(0, bracketDelta(value))
		}
	}
	return lines
}

// line returns the line of path, or of its nearest enclosing key, or 0.
func (kl keyLines) line(path string) int {
	for path != "" {
		if n, ok := kl[path]; ok {
			return n
		}
		k := max(strings.LastIndexByte(path, '.'), strings.LastIndexByte(path, '['))
		if k <= 0 {
			return 0
		}
		path = path[:k]
	}
	return 0
}

// keyEnd returns the index of the '=' ending the key of a `key = value`
// line, skipping quoted key parts, or -1.
func keyEnd(t string) int {
	var quote byte
	for i := 0; i < len(t); i++ {
		c := t[i]
		switch {
		case quote != 0:
			if c == quote {
				quote = 0
			}
		case c == '"' || c == '\'':
			quote = c
		case c == '=':
			return i
		case c == '#':
			return -1
		}
	}
	return -1
}

// splitDottedKey splits a TOML key such as `a."b.c" . d` into its parts,
// unquoted.
func splitDottedKey(k string) []string {
	var parts []string
	var cur strings.Builder
	var quote byte
	for i := 0; i < len(k); i++ {
		c := k[i]
		switch {
		case quote != 0:
			if c == quote {
				quote = 0
			} else {
				cur.WriteByte(c)
			}
		case c == '"' || c == '\'':
			quote = c
		case c == '.':
			parts = append(parts, strings.TrimSpace(cur.String()))
			cur.Reset()
		case c == ' ' || c == '\t':
		default:
			cur.WriteByte(c)
		}
	}
	return append(parts, strings.TrimSpace(cur.String()))
}

// bracketDelta counts opening minus closing brackets and braces outside
// strings and comments.
func bracketDelta(s string) int {
	d := 0
	var quote byte
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case quote != 0:
			if c == '\\' && quote == '"' {
				i++
			} else if c == quote {
				quote = 0
			}
		case c == '"' || c == '\'':
			quote = c
		case c == '#':
			return d
		case c == '[' || c == '{':
			d++
		case c == ']' || c == '}':
			d--
		}
	}
	return d
}
