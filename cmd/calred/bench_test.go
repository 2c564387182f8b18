package main

import (
	"bufio"
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"testing"

	"calred/calorimeter"
)

// BenchmarkReduce1e6 reduces a log of 10⁶ readings end to end (read, detect
// periods, every method, budget, report). Target: under 3 s per run on one
// core of the 2-core CI machine; measured 1.4 s (issue "corrected temperature
// change").
func BenchmarkReduce1e6(b *testing.B) {
	sim := calorimeter.Simulation{
		Duration: 1e6 * 0.05, Interval: 0.05, MixTime: 15000,
		StartTemperature: 297.9, ConvergenceTemperature: 298.15, CoolingConstant: 1e-4,
		HeatCapacity: 512, Heat: -150, ReleaseRate: 0.01, ProbeLag: 2,
		Noise: 0.00015, Quantum: 0.0001, Seed: 3,
	}
	t, theta, _ := sim.Run()
	if t == nil {
		b.Fatal(sim.Validate())
	}
	path := filepath.Join(b.TempDir(), "long.csv")
	f, err := os.Create(path)
	if err != nil {
		b.Fatal(err)
	}
	w := bufio.NewWriter(f)
	fmt.Fprintln(w, "t (s),T (K)")
	for i := range t {
		fmt.Fprintf(w, "%.2f,%.4f\n", t[i], theta[i])
	}
	if err := w.Flush(); err != nil {
		b.Fatal(err)
	}
	f.Close()
	args := []string{"reduce", path, "--sample-mass", "0.8281g", "--formula", "KCl", "--heat-capacity", "512±0.5J/K"}
	b.ResetTimer()
	for range b.N {
		var out, errb bytes.Buffer
		if code := run(args, nil, &out, &errb); code != exitOK && code != exitCheckFail {
			b.Fatalf("exit %d: %s", code, errb.String())
		}
	}
}
