//go:build tools

// Package tools pins the chosen dependencies in go.mod until code imports them.
package tools

import (
	_ "github.com/gocarina/gocsv"
	_ "github.com/gofrs/flock"
	_ "github.com/rogpeppe/go-internal/testscript"
	_ "github.com/spf13/pflag"
	_ "github.com/vbauerster/mpb/v8"
	_ "gonum.org/v1/gonum/integrate"
	_ "gonum.org/v1/gonum/mat"
	_ "gonum.org/v1/gonum/optimize"
	_ "gonum.org/v1/gonum/stat"
	_ "gonum.org/v1/gonum/stat/distuv"
	_ "gonum.org/v1/plot"
)
