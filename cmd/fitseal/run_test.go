package main

import (
	"context"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"fitseal/runner"
)

// TestReportMissingNamesEmptyGroups reads real projects and checks the
// notes that run prints on stderr (under -q too): the dataset's count of
// missing rows, then one line per group of a split dataset whose rows were
// all skipped as missing, naming the dataset, the group, its rows and every
// analysis of it, in the order of the file.
func TestReportMissingNamesEmptyGroups(t *testing.T) {
	tests := []struct {
		name     string
		dataset  string // the [[dataset]] table's extra keys
		analyses []string
		csv      string
		want     []string
	}{
		{
			name:     "one group all missing",
			dataset:  `split_by = "well"`,
			analyses: []string{"nitrate"},
			csv:      "well,x\nmw-1,1.5\nmw-2,NA\nmw-1,2.5\nmw-2,\nmw-1,3\n",
			want: []string{
				`fitseal: note: dataset "nitrate": 2 rows skipped as missing (cells "", "NA")`,
				`fitseal: note: dataset "nitrate", group "mw-2": all 2 of its rows were skipped as missing, so analysis "nitrate/mw-2" has no observations and every family is listed as not applicable`,
			},
		},
		{
			name:     "one row, two analyses, groups in file order",
			dataset:  `split_by = "well"`,
			analyses: []string{"nitrate", "second"},
			csv:      "well,x\nmw-9,NA\nmw-1,1.5\nmw-3,NA\nmw-1,2.5\nmw-3,NA\n",
			want: []string{
				`fitseal: note: dataset "nitrate": 3 rows skipped as missing (cells "", "NA")`,
				`fitseal: note: dataset "nitrate", group "mw-9": its one row was skipped as missing, so analyses "nitrate/mw-9", "second/mw-9" have no observations and every family is listed as not applicable`,
				`fitseal: note: dataset "nitrate", group "mw-3": all 2 of its rows were skipped as missing, so analyses "nitrate/mw-3", "second/mw-3" have no observations and every family is listed as not applicable`,
			},
		},
		{
			name:     "rows where leaves out are not missing",
			dataset:  "split_by = \"well\"\nwhere = { column = \"site\", equals = \"north\" }",
			analyses: []string{"nitrate"},
			csv:      "well,site,x\nmw-1,north,1.5\nmw-2,south,2\nmw-2,north,NA\nmw-1,north,2.5\n",
			want: []string{
				`fitseal: note: dataset "nitrate": 1 row skipped as missing (cells "", "NA")`,
				`fitseal: note: dataset "nitrate", group "mw-2": its one row was skipped as missing, so analysis "nitrate/mw-2" has no observations and every family is listed as not applicable`,
			},
		},
		{
			name:     "every group keeps an observation",
			dataset:  `split_by = "well"`,
			analyses: []string{"nitrate"},
			csv:      "well,x\nmw-1,1.5\nmw-2,NA\nmw-2,2\n",
			want:     []string{`fitseal: note: dataset "nitrate": 1 row skipped as missing (cells "", "NA")`},
		},
		{
			name:     "nothing missing",
			dataset:  `split_by = "well"`,
			analyses: []string{"nitrate"},
			csv:      "well,x\nmw-1,1.5\nmw-2,2\n",
			want:     nil,
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			dir := t.TempDir()
			toml := "name = \"wells\"\n[[dataset]]\nname = \"nitrate\"\nfile = \"wells.csv\"\ncolumn = \"x\"\n" + tt.dataset +
				"\n[[candidates]]\nname = \"c\"\nfamilies = [\"lognormal\"]\n"
			for _, a := range tt.analyses {
				toml += "[[analysis]]\nname = \"" + a + "\"\ndataset = \"nitrate\"\ncandidates = \"c\"\n"
			}
			write := func(name, text string) {
				if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			write("fitseal.toml", toml)
			write("wells.csv", tt.csv)
			p, err := runner.Load(filepath.Join(dir, "fitseal.toml"))
			if err != nil {
				t.Fatal(err)
			}
			data, err := runner.ReadAll(p)
			if err != nil {
				t.Fatal(err)
			}
			var b strings.Builder
			reportMissing(&b, &runner.Results{Project: p, Data: data})
			var got []string
			if b.Len() > 0 {
				got = strings.Split(strings.TrimSuffix(b.String(), "\n"), "\n")
			}
			if strings.Join(got, "\n") != strings.Join(tt.want, "\n") {
				t.Errorf("stderr notes:\n%s\nwant:\n%s", strings.Join(got, "\n"), strings.Join(tt.want, "\n"))
			}
		})
	}
}

// TestFileErrorsExit2: a path that cannot be read or written is bad input
// (exit 2), named with the reason, without the system call ("open", "read",
// "mkdir", "lstat") or a temporary file's name.
func TestFileErrorsExit2(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "afile")
	project := filepath.Join(dir, "fitseal.toml")
	key := filepath.Join(dir, "key")
	for name, text := range map[string]string{
		file:                           "x\n",
		filepath.Join(dir, "life.csv"): "hours\n1.5\n2.5\n3.1\n2.2\n4\n",
		project:                        "name = \"life\"\n[settings]\nbootstrap = 0\n[[dataset]]\nname = \"life\"\nfile = \"life.csv\"\ncolumn = \"hours\"\n[[candidates]]\nname = \"c\"\nfamilies = [\"normal\"]\n[[analysis]]\ndataset = \"life\"\ncandidates = \"c\"\n[report]\npdf = false\nfigures = false\n",
	} {
		if err := os.WriteFile(name, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if code := run(context.Background(), []string{"keygen", "-o", key}, io.Discard, io.Discard); code != 0 {
		t.Fatalf("keygen: exit %d", code)
	}
	tests := []struct {
		name string
		args []string
		want string // the first line on stderr
	}{
		{"project is a folder", []string{"run", "-q", dir},
			"fitseal: error: " + dir + ": is a directory"},
		{"signing key is a folder", []string{"run", "-q", "--key", dir, "-o", filepath.Join(dir, "o1"), project},
			"fitseal: error: signing key " + dir + ": is a directory"},
		{"output under a file", []string{"run", "-q", "--key", key, "-o", filepath.Join(file, "b.tar.gz"), project},
			"fitseal: error: writing " + filepath.Join(file, "b.tar.gz") + ": " + file + ": not a directory"},
		{"public key missing", []string{"verify", "--key", filepath.Join(dir, "no.pub"), dir},
			"fitseal: error: --key: public key " + filepath.Join(dir, "no.pub") + ": no such file or directory"},
		{"key pair under a file", []string{"keygen", "-o", filepath.Join(file, "key")},
			"fitseal: error: keygen: writing " + filepath.Join(file, "key") + ": not a directory"},
		{"init into a file", []string{"init", file},
			"fitseal: error: init: " + file + " is a file, not a folder; nothing was written"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var stderr strings.Builder
			code := run(context.Background(), tt.args, io.Discard, &stderr)
			first, _, _ := strings.Cut(stderr.String(), "\n")
			if code != 2 || first != tt.want {
				t.Errorf("exit %d, stderr:\n%s\nwant exit 2 and first line\n%s", code, stderr.String(), tt.want)
			}
		})
	}
}
