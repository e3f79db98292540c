package runner

import (
	"bufio"
	"encoding/csv"
	"errors"
	"io"
	"reflect"
	"strings"
	"testing"
	"unicode/utf8"
)

// sameAsEncodingCSV reads data with recordReader and with encoding/csv
// (FieldsPerRecord = -1, as ReadCSV uses it) and fails at the first
// record, field position or error that differs.
func sameAsEncodingCSV(t *testing.T, data string, comma rune, bufSize int) {
	t.Helper()
	cr := csv.NewReader(bufio.NewReaderSize(strings.NewReader(data), bufSize))
	cr.Comma = comma
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	rr := newRecordReader(bufio.NewReaderSize(strings.NewReader(data), bufSize), comma)
	for n := 1; ; n++ {
		want, werr := cr.Read()
		got, gerr := rr.read()
		if (werr == nil) != (gerr == nil) || (werr != nil && !sameError(werr, gerr)) {
			t.Fatalf("%q (comma %q), record %d: error %v, encoding/csv %v", data, comma, n, gerr, werr)
		}
		if werr != nil {
			return
		}
		gs := make([]string, len(got))
		for i, f := range got {
			gs[i] = string(f)
		}
		if !reflect.DeepEqual(gs, want) {
			t.Fatalf("%q (comma %q), record %d: %q, encoding/csv %q", data, comma, n, gs, want)
		}
		for i := range want {
			wl, wc := cr.FieldPos(i)
			gl, gc := rr.fieldPos(i)
			if wl != gl || wc != gc {
				t.Fatalf("%q (comma %q), record %d field %d: at %d:%d, encoding/csv %d:%d", data, comma, n, i, gl, gc, wl, wc)
			}
		}
	}
}

func sameError(want, got error) bool {
	var wp, gp *csv.ParseError
	if errors.As(want, &wp) {
		return errors.As(got, &gp) && *wp == *gp
	}
	return want.Error() == got.Error() && (want == io.EOF) == (got == io.EOF)
}

var recordCases = []string{
	"", "\n", "a", "a\n", "a,b\n1,2\n", "a,b\r\n1,2\r\n", "a\r", "a\rb\n", "\n\n\na\n\n", " ,\t\n",
	`"a","b"` + "\n", `"a""b",c` + "\n", `"a` + "\nb\",c\n", `"unterminated`, "\"x\"y\n", "a\"b\n", `"",""` + "\n",
	"\"a\r\nb\"\r\n", "\"\n\"\n", "x;y\n1;2\n", "é,漢\n\xff,\xfe\n", "a,\"b\n\n\nc\",d\ne\n", "\"a\"\r", "\"a\"\r\n",
	"a,b,\n,,\n", "\ufeffx\n1\n", strings.Repeat("1234567890,", 200) + "\n" + strings.Repeat("x", 5000) + "\n",
	"\"" + strings.Repeat("q", 300) + "\n" + strings.Repeat("r", 300) + "\"\n",
}

func TestRecordReaderMatchesEncodingCSV(t *testing.T) {
	for _, data := range recordCases {
		for _, comma := range []rune{',', ';', '\t', '§', '漢', '"', '\n', 0, utf8.RuneError} {
			for _, size := range []int{16, 4096} {
				sameAsEncodingCSV(t, data, comma, size)
			}
		}
	}
}

// FuzzRecordReader: on any input and delimiter recordReader gives what
// encoding/csv gives, with bufio buffers small enough to split lines.
func FuzzRecordReader(f *testing.F) {
	for _, s := range recordCases {
		f.Add(s, ',', true)
		f.Add(s, ';', false)
	}
	f.Fuzz(func(t *testing.T, data string, comma rune, small bool) {
		size := 4096
		if small {
			size = 16
		}
		sameAsEncodingCSV(t, data, comma, size)
	})
}
