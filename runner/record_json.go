package runner

import "strconv"

// AppendIndentedLists appends the record's two long lists, seeds and
// optimizers, exactly as json.MarshalIndent(v, "", "  ") writes them when
// the record is embedded in the top-level object v (run.json): from
// `"seeds": ` to the optimizers' closing bracket, without the indent
// before the first key or a newline after the last bracket. A large run's
// run.json is almost all optimizer records (9,000 fits: 2.7 MB), which
// json.Indent took 26 ms to indent; bundle.encodeRunJSON writes the rest
// with encoding/json and this by hand (TestEncodeRunJSONMatchesMarshalIndent
// compares the bytes).
func (r *Record) AppendIndentedLists(b []byte) []byte {
	b = append(b, `"seeds": `...)
	b = appendIndentedList(b, r.Seeds, func(b []byte, s *Seed) []byte {
		b = append(b, "{\n      \"analysis\": "...)
		b = appendJSONString(b, s.Analysis)
		b = append(b, ",\n      \"family\": "...)
		b = appendJSONString(b, s.Family)
		b = append(b, ",\n      \"purpose\": "...)
		b = appendJSONString(b, s.Purpose)
		b = append(b, ",\n      \"replicates\": "...)
		b = strconv.AppendInt(b, int64(s.Replicates), 10)
		b = append(b, ",\n      \"identity_of_replicate_0\": "...)
		b = appendJSONString(b, s.Identity)
		b = append(b, ",\n      \"seed_of_replicate_0\": [\n        "...)
		b = strconv.AppendUint(b, s.FirstSeed[0], 10)
		b = append(b, ",\n        "...)
		b = strconv.AppendUint(b, s.FirstSeed[1], 10)
		return append(b, "\n      ]\n    }"...)
	})
	b = append(b, ",\n  \"optimizers\": "...)
	return appendIndentedList(b, r.Optimizers, func(b []byte, f *RecordedFit) []byte {
		b = append(b, "{\n      \"analysis\": "...)
		b = appendJSONString(b, f.Analysis)
		b = append(b, ",\n      \"family\": "...)
		b = appendJSONString(b, f.Family)
		b = append(b, ",\n      \"optimizer\": "...)
		if o := f.Optimizer; o == nil {
			b = append(b, "null"...)
		} else {
			b = append(b, "{\n        \"method\": "...)
			b = appendJSONString(b, o.Method)
			b = append(b, ",\n        \"iterations\": "...)
			b = strconv.AppendInt(b, int64(o.Iterations), 10)
			b = append(b, ",\n        \"evaluations\": "...)
			b = strconv.AppendInt(b, int64(o.Evaluations), 10)
			b = append(b, ",\n        \"gradient_norm\": "...)
			b = appendNumber(b, o.GradientNorm)
			b = append(b, ",\n        \"converged\": "...)
			b = strconv.AppendBool(b, o.Converged)
			b = append(b, ",\n        \"reason\": "...)
			b = appendJSONString(b, o.Reason)
			b = append(b, ",\n        \"note\": "...)
			b = appendJSONString(b, o.Note)
			b = append(b, "\n      }"...)
		}
		return append(b, "\n    }"...)
	})
}

// appendIndentedList appends list as json.MarshalIndent writes a list
// valued at depth one: null when nil, [] when empty, else each item on its
// own line at depth two, written by item from its opening brace on.
func appendIndentedList[T any](b []byte, list []T, item func(b []byte, x *T) []byte) []byte {
	switch {
	case list == nil:
		return append(b, "null"...)
	case len(list) == 0:
		return append(b, "[]"...)
	}
	b = append(b, '[')
	for i := range list {
		if i > 0 {
			b = append(b, ',')
		}
		b = item(append(b, "\n    "...), &list[i])
	}
	return append(b, "\n  ]"...)
}
