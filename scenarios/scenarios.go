// Package scenarios holds the example models of trellis, each with a short
// story and the answers expected from it.
//
// Every scenario lives in its own directory NAME/ with model.trl (the model),
// README.md (the story) and expected.json (the optimum cost per priority, the
// number of tied optimal configurations, the number of valid
// configurations and the optimal configurations). The files are embedded, so
// the trellis command can carry the demo model inside its binary.
package scenarios

import (
	"embed"
	"encoding/json"
	"fmt"
	"io/fs"
	"sort"
)

// FS holds every scenario's files, at NAME/model.trl, NAME/README.md and
// NAME/expected.json.
//
//go:embed */model.trl */README.md */expected.json
var FS embed.FS

// DemoName is the scenario the trellis command solves when given no file.
const DemoName = "network"

//go:embed network/model.trl
var demoModel string

// Demo returns the source of the demo model (the network build-out). The
// caller may modify the returned slice.
func Demo() []byte { return []byte(demoModel) }

// Cost is the cost of a configuration at one priority.
type Cost struct {
	Priority int64 `json:"priority"`
	Value    int64 `json:"value"`
}

// Expected is the content of a scenario's expected.json.
type Expected struct {
	// Optimum is the least cost, one entry per priority, highest first.
	Optimum []Cost `json:"optimum"`
	// Ties is the number of valid configurations with the optimum cost, in
	// decimal.
	Ties string `json:"ties"`
	// Total is the number of valid configurations, in decimal.
	Total string `json:"total"`
	// Optimal lists the shown atoms of each optimal configuration, each
	// list in term order.
	Optimal [][]string `json:"optimal"`
}

// Names returns the names of the scenarios in sorted order.
func Names() []string {
	entries, err := fs.ReadDir(FS, ".")
	if err != nil {
		panic("scenarios: embedded files unreadable: " + err.Error())
	}
	var names []string
	for _, e := range entries {
		if e.IsDir() {
			names = append(names, e.Name())
		}
	}
	sort.Strings(names)
	return names
}

// Model returns the source of scenario name's model.
func Model(name string) ([]byte, error) {
	return FS.ReadFile(name + "/model.trl")
}

// Answers returns scenario name's expected answers.
func Answers(name string) (Expected, error) {
	var e Expected
	data, err := FS.ReadFile(name + "/expected.json")
	if err != nil {
		return e, err
	}
	if err := json.Unmarshal(data, &e); err != nil {
		return e, fmt.Errorf("scenarios: %s/expected.json: %v", name, err)
	}
	return e, nil
}
