package bundle

import (
	"bytes"
	"encoding/json"
	"fmt"

	"fitseal/runner"
)

// recordedSlice rebuilds the recorded results of a full bundle from its
// results.json without fitting, checks that they give back every recorded
// result file byte for byte, and returns them whole (for re-rendering) with
// a payload whose results/ files hold only the slice's analyses.
func recordedSlice(proj *runner.Project, payload map[string][]byte, rec *RunRecord, slice runner.Shard) (*runner.Results, map[string][]byte, error) {
	data, err := runner.ReadAll(proj)
	if err != nil {
		return nil, nil, fmt.Errorf("the bundled data do not read: %v", err)
	}
	plan := runner.MakePlan(proj, data)
	doc := [][]byte{payload["results/"+runner.ResultsFile]}
	all, err := runner.Rebuild(proj, data, plan, doc, rec.Seeds)
	if err != nil {
		return nil, nil, fmt.Errorf("the recorded results cannot be read back: %v", err)
	}
	if err := sameResultFiles(all, payload, ""); err != nil {
		return nil, nil, err
	}
	part, err := runner.Rebuild(proj, data, plan.Only(slice), doc, rec.Seeds)
	if err != nil {
		return nil, nil, fmt.Errorf("the recorded results cannot be read back: %v", err)
	}
	files, err := part.Files()
	if err != nil {
		return nil, nil, err
	}
	out := map[string][]byte{}
	for p, b := range payload {
		out[p] = b
	}
	for name, b := range files {
		out["results/"+name] = b
	}
	return all, out, nil
}

// sameResultFiles checks that res gives back the result files of payload
// byte for byte; who names the part in the error.
func sameResultFiles(res *runner.Results, payload map[string][]byte, who string) error {
	files, err := res.Files()
	if err != nil {
		return err
	}
	for _, name := range []string{runner.FitsFile, runner.ParametersFile, runner.DerivedFile, runner.GOFFile, runner.ResultsFile} {
		same := bytes.Equal(files[name], payload["results/"+name])
		if !same && name == runner.ResultsFile {
			// results.json is compared by content, not layout: bundles made
			// before it was written compactly hold it indented.
			same = sameJSON(files[name], payload["results/"+name])
		}
		if !same {
			return fmt.Errorf("%sdata/results/%s is not what its results.json gives when read back (edited, or made by another build)", who, name)
		}
	}
	return nil
}

// sameJSON says whether a and b are the same JSON text apart from
// insignificant white space (json.Compact of each is equal).
func sameJSON(a, b []byte) bool {
	var ca, cb bytes.Buffer
	if json.Compact(&ca, a) != nil || json.Compact(&cb, b) != nil {
		return false
	}
	return bytes.Equal(ca.Bytes(), cb.Bytes())
}
