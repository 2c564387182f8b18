// Command generate writes the demo data in examples/: synthetic but
// physically consistent temperature logs of two invented labs, made with the
// calorimeter package's simulator (Newtonian vessel, first-order release or
// heater, probe lag, noise, resolution). Run it from the repository root:
//
//	go run ./examples/generate
//
// The logs are committed; TestExamplesAreGenerated checks they still match.
//
// Harbour Street College (teaching lab, coffee cups): a class calibration by
// hot/cold water mixing, then eight student runs dissolving KNO3, NH4NO3 and
// NH4Cl, some with the classic mistakes (a late start, a bumped probe, a
// missing lid, the wrong salt on the label).
//
// Kestrel Analytical (QC lab, precision isoperibol calorimeter): eight
// electrical calibrations over four weeks for the control chart, and a KCl
// check-standard run.
package main

import (
	"fmt"
	"os"
	"path/filepath"

	"calred/examples/internal/demo"
)

func main() {
	root := "examples"
	if len(os.Args) > 1 {
		root = os.Args[1]
	}
	files, err := demo.Files()
	if err != nil {
		fmt.Fprintln(os.Stderr, "generate:", err)
		os.Exit(1)
	}
	for name, body := range files {
		p := filepath.Join(root, name)
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			fmt.Fprintln(os.Stderr, "generate:", err)
			os.Exit(1)
		}
		if err := os.WriteFile(p, body, 0o644); err != nil {
			fmt.Fprintln(os.Stderr, "generate:", err)
			os.Exit(1)
		}
	}
	fmt.Printf("wrote %d files under %s\n", len(files), root)
}
