package runner

import (
	"fmt"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
)

// sameReading checks that parsing data in chunks on several workers gives
// exactly what parsing it row after row gives: the same groups in the
// same order with the same values and counts, or the same error (message,
// line and column).
func sameReading(t *testing.T, data string, d Dataset, workers, chunkSize int) {
	t.Helper()
	want, wantErr := readCSV("in.csv", strings.NewReader(data), &d, 1, chunkSize)
	got, gotErr := readCSV("in.csv", strings.NewReader(data), &d, workers, chunkSize)
	if fmt.Sprint(gotErr) != fmt.Sprint(wantErr) {
		t.Fatalf("workers %d, chunk %d: error %v, want %v\ninput %q", workers, chunkSize, gotErr, wantErr, data)
	}
	if wantErr != nil {
		return
	}
	if !reflect.DeepEqual(got, want) {
		t.Fatalf("workers %d, chunk %d: chunked reading differs from row by row\ninput %q\ngot  %+v\nwant %+v",
			workers, chunkSize, data, describe(got), describe(want))
	}
}

// describe prints a reading's groups for a failure message.
func describe(dd *DatasetData) string {
	var b strings.Builder
	fmt.Fprintf(&b, "rows %d filtered %d missing %d;", dd.Rows, dd.Filtered, dd.Missing)
	for _, g := range dd.Groups {
		fmt.Fprintf(&b, " %q: %+v rows %d missing %d;", g.Name, g.Data, g.Rows, g.Missing)
	}
	return b.String()
}

// TestReadCSVChunked: the cases of TestReadCSV and TestReadCSVErrors, and
// generated files, read in chunks of every small size on 2 and 3 workers,
// give what reading row after row gives (see rowsChunked).
func TestReadCSVChunked(t *testing.T) {
	obs := Dataset{Column: "x", Missing: []string{"", "NA"}}
	split := Dataset{Column: "x", SplitBy: "g", Where: &Where{Column: "s", Equals: "keep"}, StatusColumn: "c",
		Left: []string{"<"}, Right: []string{"+"}, Missing: []string{"", "NA"}}
	cases := []struct {
		name string
		d    Dataset
		csv  string
	}{
		{"byte-order mark, blank line, missing", obs, "\ufeffx,y\n1.5,a\nNA,b\n\n,c\n2,d\n"},
		{"CRLF line ends and a last line without one", obs, "x\r\n1\r\n2\r\n\r\n3"},
		{"a lone carriage return at the end", obs, "x\n1\n2\r"},
		{"error in a late chunk: its line", obs, "x\n1\n2\n3\n4\n5\nabc\n6\n7\n"},
		{"two errors: the first one wins", obs, "x\n1\n2\nfoo\n3\nbar\n"},
		{"quote after some chunks", obs, "x,y\n1,a\n2,b\n3,b\n4,\"q\nr\"\n5,c\n6,d\n"},
		{"quoted header over two lines", Dataset{Column: "x", Missing: []string{""}}, "\"a\nb\",x\n1,2\n3,4\n5,6\n"},
		{"bare quote late", obs, "x\n1\n2\n3\n4\n\"5\n"},
		{"ragged row", obs, "x,y\n1,2\n3,4\n5\n"},
		{"groups interleaved over chunks", split,
			"g,s,c,x\nb,keep,,1\na,keep,<,2\nb,drop,,3\nc,keep,+,4\na,keep,,NA\nb,keep,,6\nd,drop,,7\nc,keep,,8\n"},
		{"empty group name late", split, "g,s,c,x\na,keep,,1\nb,keep,,2\n,keep,,3\n"},
		{"interval bounds", Dataset{LowerColumn: "lo", UpperColumn: "hi", Missing: []string{"", "NA"}},
			"lo,hi\n1,2\n,5\n7,\nNA,3\n,\n2,9\n3,3\n"},
		{"interval bounds reversed late", Dataset{LowerColumn: "lo", UpperColumn: "hi", Missing: []string{""}},
			"lo,hi\n1,2\n4,4\n2,9\n5,4\n3,3\n"},
		{"trials", Dataset{Column: "k", TrialsColumn: "n", Missing: []string{""}}, "k,n\n3,10\n0,4\n1,1\n2,9\n"},
		{"multi-byte delimiter", Dataset{Column: "v", Delimiter: "§", Missing: []string{""}}, "u§v\n1§2\n3§4\n5§6\n"},
		{"blank lines over chunks", split, "g,s,c,x\na,keep,,1\n\nb,drop,,2\n\n\n"},
		{"blank lines counted over chunks", Dataset{Column: "x", Missing: []string{""}}, "x\n1\n\n2\n\n\n3\n\r\n"},
		{"blank line where the empty cell is not missing, late", Dataset{Column: "x", Missing: []string{"NA"}}, "x\n1\n2\n3\nNA\n\n4\n"},
		{"header only", obs, "x\n"},
		{"no line break at all", obs, "x"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			for chunk := 1; chunk <= len(c.csv)+1; chunk++ {
				for _, workers := range []int{2, 3} {
					sameReading(t, c.csv, c.d, workers, chunk)
				}
			}
		})
	}
	t.Run("generated files", func(t *testing.T) {
		rng := rand.New(rand.NewPCG(1, 2))
		for i := 0; i < 200; i++ {
			var b strings.Builder
			b.WriteString("g,s,c,x\n")
			rows := rng.IntN(300)
			for r := 0; r < rows; r++ {
				switch rng.IntN(40) {
				case 0:
					b.WriteString("\n")
					continue
				case 1:
					b.WriteString("a,keep,,NA\r\n")
					continue
				}
				g := string(rune('a' + rng.IntN(5)))
				s := "keep"
				if rng.IntN(6) == 0 {
					s = "drop"
				}
				c := []string{"", "", "", "<", "+"}[rng.IntN(5)]
				fmt.Fprintf(&b, "%s,%s,%s,%.6g\n", g, s, c, rng.NormFloat64()*100)
			}
			if rng.IntN(10) == 0 {
				b.WriteString("a,keep,,\"7\"\n")
			}
			if rng.IntN(10) == 0 {
				b.WriteString("a,keep,,oops\n")
			}
			data := b.String()
			sameReading(t, data, split, 2, 1+rng.IntN(200))
			sameReading(t, data, split, 3, 1+rng.IntN(2000))
		}
	})
}

// FuzzReadCSVChunked: any input, read in chunks on several workers, gives
// what reading it row after row gives.
func FuzzReadCSVChunked(f *testing.F) {
	for _, s := range []string{
		"x\n1\n2\n", "x,s\n1,<\n2,+\n3,\n", "lo,hi\n1,2\n,3\n4,\n", "x,n\n1,3\n0,2\n",
		"g,s,x\na,keep,1\nb,drop,2\na,keep,3\n", "x;y\n1;2\n", "\ufeffx\n1e308\n-0\n", "x\n\"1\"\"\n",
		"x\r\n1\r\n\r\n2\r", "x\n1\n\"2\n3\"\n4\n",
	} {
		for v := range fuzzDatasets {
			f.Add(s, uint8(v), uint8(3))
		}
	}
	f.Fuzz(func(t *testing.T, data string, variant, chunk uint8) {
		d := fuzzDatasets[int(variant)%len(fuzzDatasets)]
		sameReading(t, data, d, 2, 1+int(chunk))
	})
}

// BenchmarkReadCSVChunked reads the 100,000 rows of BenchmarkReadCSV row
// after row and in 1 MiB chunks on 2 workers (compare with ns/op; the
// chunks only pay where cores are free).
func BenchmarkReadCSVChunked(b *testing.B) {
	var sb strings.Builder
	sb.WriteString("set,x\n")
	rng := rand.New(rand.NewPCG(3, 4))
	for i := 0; i < 1_000_000; i++ {
		fmt.Fprintf(&sb, "s%03d,%.15g\n", i/1000, rng.ExpFloat64()*12.5)
	}
	data := sb.String()
	d := Dataset{Column: "x", SplitBy: "set", Missing: []string{""}}
	for _, workers := range []int{1, 2} {
		b.Run(fmt.Sprintf("workers=%d", workers), func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			for b.Loop() {
				if _, err := readCSV("bench.csv", strings.NewReader(data), &d, workers, csvChunkSize); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
