package demo

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
)

// TestExamplesAreGenerated checks that the committed demo files are exactly
// what `go run ./examples/generate` writes, so the demo can be reproduced.
func TestExamplesAreGenerated(t *testing.T) {
	files, err := Files()
	if err != nil {
		t.Fatal(err)
	}
	for name, want := range files {
		got, err := os.ReadFile(filepath.Join("..", "..", name))
		if err != nil {
			t.Errorf("%s: %v (run `go run ./examples/generate`)", name, err)
			continue
		}
		if !bytes.Equal(got, want) {
			t.Errorf("examples/%s differs from the generator's output (run `go run ./examples/generate`)", name)
		}
	}
}
