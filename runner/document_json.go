package runner

import (
	"math"
	"strconv"
	"unicode/utf8"
)

// results.json layout (ResultsFormat): the values and their order are what
// encoding/json gives for docRoot (the struct tags in document.go are the
// schema, and Rebuild reads the file back through them), but the file is
// written by hand, without reflection, and without indentation: a
// newline goes before each element of the datasets, groups, analyses, fits,
// derived and gof arrays and at the end, and nowhere else. So one line is
// one fit (with its parameters) or one row, and the file is about half the
// size of the indented form (11.7 against 20.8 MB for 1000 analyses × 9
// families), which is also half the work for gzip. Numbers are Number's
// shortest round-trip form (null for NaN and ±Inf); the settings' float64
// fields keep encoding/json's form; strings are escaped exactly as
// encoding/json escapes them (HTML characters included), so
// json.Compact of this file equals json.Marshal of the document
// (TestResultsJSONMatchesEncodingJSON).

// appendDocument appends results.json to b.
func appendDocument(b []byte, doc *docRoot) []byte {
	b = appendDocumentHead(b, doc)
	if doc.Analyses == nil {
		return append(b, "null}\n"...)
	}
	b = append(b, '[')
	for i := range doc.Analyses {
		b = appendAnalysisItem(b, &doc.Analyses[i], i == 0)
	}
	return append(b, documentTail...)
}

// appendAnalysisItem appends one analysis of results.json's list, after a
// comma unless it is the list's first; the list is written whole here and
// in parts by Results.resultsJSON.
func appendAnalysisItem(b []byte, a *docAnalysis, firstInList bool) []byte {
	if !firstInList {
		b = append(b, ',')
	}
	return appendAnalysis(append(b, '\n'), a)
}

// documentTail closes results.json's list of analyses and the document.
const documentTail = "]}\n"

// appendDocumentHead appends results.json up to its analyses: up to and
// including `"analyses":`.
func appendDocumentHead(b []byte, doc *docRoot) []byte {
	b = append(b, `{"format":`...)
	b = appendJSONString(b, doc.Format)
	b = append(b, `,"project":`...)
	b = appendJSONString(b, doc.Project)
	b = append(b, `,"settings":`...)
	b = appendSettings(b, &doc.Settings)
	b = append(b, `,"datasets":`...)
	if doc.Datasets == nil {
		b = append(b, "null"...)
	} else {
		b = append(b, '[')
		for i := range doc.Datasets {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendDataset(append(b, '\n'), &doc.Datasets[i])
		}
		b = append(b, ']')
	}
	return append(b, `,"analyses":`...)
}

func appendSettings(b []byte, s *Settings) []byte {
	b = append(b, `{"seed":`...)
	b = strconv.AppendUint(b, s.Seed, 10)
	b = append(b, `,"criterion":`...)
	b = appendJSONString(b, s.Criterion)
	b = append(b, `,"confidence":`...)
	b = appendJSONFloat(b, s.Confidence)
	b = append(b, `,"intervals":`...)
	b = appendJSONString(b, s.Intervals)
	b = append(b, `,"bootstrap":`...)
	b = strconv.AppendInt(b, int64(s.Bootstrap), 10)
	b = append(b, `,"tolerance":`...)
	b = appendJSONFloat(b, s.Tolerance)
	b = append(b, `,"max_iterations":`...)
	b = strconv.AppendInt(b, int64(s.MaxIterations), 10)
	b = append(b, `,"require_clean_git":`...)
	b = strconv.AppendBool(b, s.RequireCleanGit)
	return append(b, '}')
}

func appendDataset(b []byte, d *docDataset) []byte {
	b = append(b, `{"name":`...)
	b = appendJSONString(b, d.Name)
	b = append(b, `,"file":`...)
	b = appendJSONString(b, d.File)
	b = append(b, `,"rows":`...)
	b = strconv.AppendInt(b, int64(d.Rows), 10)
	b = append(b, `,"filtered_by_where":`...)
	b = strconv.AppendInt(b, int64(d.Filtered), 10)
	b = append(b, `,"missing":`...)
	b = strconv.AppendInt(b, int64(d.Missing), 10)
	if len(d.Groups) > 0 {
		b = append(b, `,"groups":[`...)
		for i := range d.Groups {
			g := &d.Groups[i]
			if i > 0 {
				b = append(b, ',')
			}
			b = append(b, "\n{\"name\":"...)
			b = appendJSONString(b, g.Name)
			b = append(b, `,"rows":`...)
			b = strconv.AppendInt(b, int64(g.Rows), 10)
			b = append(b, `,"missing":`...)
			b = strconv.AppendInt(b, int64(g.Missing), 10)
			b = append(b, `,"n":`...)
			b = strconv.AppendInt(b, int64(g.N), 10)
			b = append(b, `,"n_censored":`...)
			b = strconv.AppendInt(b, int64(g.NCensored), 10)
			b = append(b, '}')
		}
		b = append(b, ']')
	}
	return append(b, '}')
}

func appendAnalysis(b []byte, a *docAnalysis) []byte {
	b = append(b, `{"name":`...)
	b = appendJSONString(b, a.Name)
	b = append(b, `,"dataset":`...)
	b = appendJSONString(b, a.Dataset)
	b = append(b, `,"n":`...)
	b = strconv.AppendInt(b, int64(a.N), 10)
	b = append(b, `,"n_censored":`...)
	b = strconv.AppendInt(b, int64(a.NCensored), 10)
	b = append(b, `,"missing":`...)
	b = strconv.AppendInt(b, int64(a.Missing), 10)
	b = append(b, `,"criterion":`...)
	b = appendJSONString(b, a.Criterion)
	b = append(b, `,"requested_criterion":`...)
	b = appendJSONString(b, a.RequestedCriterion)
	b = append(b, `,"note":`...)
	b = appendJSONString(b, a.Note)
	b = append(b, `,"fits":`...)
	if a.Fits == nil {
		b = append(b, "null"...)
	} else {
		b = append(b, '[')
		for i := range a.Fits {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendFit(append(b, '\n'), &a.Fits[i])
		}
		b = append(b, ']')
	}
	b = append(b, `,"derived":`...)
	if a.Derived == nil {
		b = append(b, "null"...)
	} else {
		b = append(b, '[')
		for i := range a.Derived {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendDerived(append(b, '\n'), &a.Derived[i])
		}
		b = append(b, ']')
	}
	b = append(b, `,"gof":`...)
	if a.GOF == nil {
		b = append(b, "null"...)
	} else {
		b = append(b, '[')
		for i := range a.GOF {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendGOF(append(b, '\n'), &a.GOF[i])
		}
		b = append(b, ']')
	}
	return append(b, '}')
}

func appendFit(b []byte, f *docFit) []byte {
	b = append(b, `{"family":`...)
	b = appendJSONString(b, f.Family)
	b = append(b, `,"applicable":`...)
	b = strconv.AppendBool(b, f.Applicable)
	if f.Inapplicable != "" {
		b = append(b, `,"inapplicable":`...)
		b = appendJSONString(b, f.Inapplicable)
	}
	b = append(b, `,"n":`...)
	b = strconv.AppendInt(b, int64(f.N), 10)
	b = append(b, `,"n_censored":`...)
	b = strconv.AppendInt(b, int64(f.NCensored), 10)
	b = append(b, `,"k":`...)
	if f.K == nil {
		b = append(b, "null"...)
	} else {
		b = strconv.AppendInt(b, int64(*f.K), 10)
	}
	b = append(b, `,"loglik":`...)
	b = appendNumber(b, f.LogLik)
	b = append(b, `,"aic":`...)
	b = appendNumber(b, f.AIC)
	b = append(b, `,"aicc":`...)
	b = appendNumber(b, f.AICc)
	b = append(b, `,"bic":`...)
	b = appendNumber(b, f.BIC)
	b = append(b, `,"delta":`...)
	b = appendNumber(b, f.Delta)
	b = append(b, `,"weight":`...)
	b = appendNumber(b, f.Weight)
	b = append(b, `,"evidence_ratio":`...)
	b = appendNumber(b, f.EvidenceRatio)
	b = append(b, `,"rank":`...)
	b = strconv.AppendInt(b, int64(f.Rank), 10)
	b = append(b, `,"support":`...)
	b = appendJSONString(b, f.Support)
	b = append(b, `,"converged":`...)
	b = strconv.AppendBool(b, f.Converged)
	b = append(b, `,"note":`...)
	b = appendJSONString(b, f.Note)
	b = append(b, `,"inference_note":`...)
	b = appendJSONString(b, f.Inference)
	b = append(b, `,"parameters":`...)
	if f.Parameters == nil {
		b = append(b, "null"...)
	} else {
		b = append(b, '[')
		for i := range f.Parameters {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendParameter(b, &f.Parameters[i])
		}
		b = append(b, ']')
	}
	if f.Optimizer != nil {
		b = append(b, `,"optimizer":`...)
		b = appendOptimizer(b, f.Optimizer)
	}
	return append(b, '}')
}

func appendParameter(b []byte, p *docParameter) []byte {
	b = append(b, `{"name":`...)
	b = appendJSONString(b, p.Name)
	b = append(b, `,"estimate":`...)
	b = appendNumber(b, p.Estimate)
	b = append(b, `,"std_error":`...)
	b = appendNumber(b, p.StdError)
	b = append(b, `,"ci_lower":`...)
	b = appendNumber(b, p.CILower)
	b = append(b, `,"ci_upper":`...)
	b = appendNumber(b, p.CIUpper)
	b = append(b, `,"ci_lower_open":`...)
	b = strconv.AppendBool(b, p.LowerOpen)
	b = append(b, `,"ci_upper_open":`...)
	b = strconv.AppendBool(b, p.UpperOpen)
	b = append(b, `,"ci_method":`...)
	b = appendJSONString(b, p.CIMethod)
	b = append(b, `,"fixed":`...)
	b = strconv.AppendBool(b, p.Fixed)
	b = append(b, `,"note":`...)
	b = appendJSONString(b, p.Note)
	return append(b, '}')
}

// appendOptimizer appends o as encoding/json writes it (compact).
func appendOptimizer(b []byte, o *Optimizer) []byte {
	b = append(b, `{"method":`...)
	b = appendJSONString(b, o.Method)
	b = append(b, `,"iterations":`...)
	b = strconv.AppendInt(b, int64(o.Iterations), 10)
	b = append(b, `,"evaluations":`...)
	b = strconv.AppendInt(b, int64(o.Evaluations), 10)
	b = append(b, `,"gradient_norm":`...)
	b = appendNumber(b, o.GradientNorm)
	b = append(b, `,"converged":`...)
	b = strconv.AppendBool(b, o.Converged)
	b = append(b, `,"reason":`...)
	b = appendJSONString(b, o.Reason)
	b = append(b, `,"note":`...)
	b = appendJSONString(b, o.Note)
	return append(b, '}')
}

func appendDerived(b []byte, d *docDerived) []byte {
	b = append(b, `{"family":`...)
	b = appendJSONString(b, d.Family)
	b = append(b, `,"quantity":`...)
	b = appendJSONString(b, d.Quantity)
	b = append(b, `,"argument":`...)
	b = appendNumber(b, d.Argument)
	b = append(b, `,"estimate":`...)
	b = appendNumber(b, d.Estimate)
	b = append(b, `,"std_error":`...)
	b = appendNumber(b, d.StdError)
	b = append(b, `,"ci_lower":`...)
	b = appendNumber(b, d.CILower)
	b = append(b, `,"ci_upper":`...)
	b = appendNumber(b, d.CIUpper)
	b = append(b, `,"ci_lower_open":`...)
	b = strconv.AppendBool(b, d.LowerOpen)
	b = append(b, `,"ci_upper_open":`...)
	b = strconv.AppendBool(b, d.UpperOpen)
	b = append(b, `,"ci_method":`...)
	b = appendJSONString(b, d.CIMethod)
	b = append(b, `,"note":`...)
	b = appendJSONString(b, d.Note)
	return append(b, '}')
}

func appendGOF(b []byte, g *docGOF) []byte {
	b = append(b, `{"family":`...)
	b = appendJSONString(b, g.Family)
	b = append(b, `,"statistic":`...)
	b = appendJSONString(b, g.Statistic)
	b = append(b, `,"value":`...)
	b = appendNumber(b, g.Value)
	b = append(b, `,"p_value":`...)
	b = appendNumber(b, g.PValue)
	b = append(b, `,"replicates":`...)
	b = strconv.AppendInt(b, int64(g.Replicates), 10)
	b = append(b, `,"note":`...)
	b = appendJSONString(b, g.Note)
	return append(b, '}')
}

// appendNumber appends x in the shortest round-trip form
// (strconv.FormatFloat(x, 'g', -1, 64)), or null for NaN and ±Inf.
func appendNumber(b []byte, x Number) []byte {
	f := float64(x)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return append(b, "null"...)
	}
	return strconv.AppendFloat(b, f, 'g', -1, 64)
}

// appendJSONFloat appends a finite f as encoding/json writes a float64:
// the shortest round-trip digits in 'f' form, in 'e' form below 1e-6 or
// from 1e21 up, with a one-digit exponent not padded ("1e-7", not "1e-07").
func appendJSONFloat(b []byte, f float64) []byte {
	format := byte('f')
	if a := math.Abs(f); a != 0 && (a < 1e-6 || a >= 1e21) {
		format = 'e'
	}
	b = strconv.AppendFloat(b, f, format, -1, 64)
	if format == 'e' {
		if n := len(b); n >= 4 && b[n-4] == 'e' && b[n-3] == '-' && b[n-2] == '0' {
			b[n-2] = b[n-1]
			b = b[:n-1]
		}
	}
	return b
}

const hexDigits = "0123456789abcdef"

// appendJSONString appends s as a JSON string escaped as encoding/json
// escapes it: `"` and `\` by a backslash; \b, \f, \n, \r and \t by their
// short forms; other control characters, <, > and & as \u00XX; U+2028 and
// U+2029 as \u2028 and \u2029; each byte of invalid UTF-8 as \ufffd.
func appendJSONString(b []byte, s string) []byte {
	b = append(b, '"')
	start := 0
	for i := 0; i < len(s); {
		c := s[i]
		if c < utf8.RuneSelf {
			if c >= 0x20 && c != '"' && c != '\\' && c != '<' && c != '>' && c != '&' {
				i++
				continue
			}
			b = append(b, s[start:i]...)
			switch c {
			case '"', '\\':
				b = append(b, '\\', c)
			case '\b':
				b = append(b, '\\', 'b')
			case '\f':
				b = append(b, '\\', 'f')
			case '\n':
				b = append(b, '\\', 'n')
			case '\r':
				b = append(b, '\\', 'r')
			case '\t':
				b = append(b, '\\', 't')
			default:
				b = append(b, '\\', 'u', '0', '0', hexDigits[c>>4], hexDigits[c&0xF])
			}
			i++
			start = i
			continue
		}
		r, size := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && size == 1:
			b = append(b, s[start:i]...)
			b = append(b, `\ufffd`...)
		case r == '\u2028' || r == '\u2029':
			b = append(b, s[start:i]...)
			b = append(b, '\\', 'u', '2', '0', '2', hexDigits[r&0xF])
		default:
			i += size
			continue
		}
		i += size
		start = i
	}
	b = append(b, s[start:]...)
	return append(b, '"')
}
