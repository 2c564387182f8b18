package main

import (
	"os"
	"path/filepath"
	"testing"
)

// TestExitCodes pins the exit codes of CONTRACT.md by calling run directly.
func TestExitCodes(t *testing.T) {
	ex := mustAbs(t, "../../examples/harbour-street")
	td := mustAbs(t, "../../testdata/logs")
	s01 := filepath.Join(ex, "s01-mbeki.csv")
	dir := t.TempDir()
	badCal := filepath.Join(dir, "bad.json")
	if err := os.WriteFile(badCal, []byte("{not json"), 0o644); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		args []string
		want int
	}{
		{"help", []string{"help"}, exitOK},
		{"command help", []string{"reduce", "--help"}, exitOK},
		{"version", []string{"--version"}, exitOK},
		{"no command", nil, exitUsage},
		{"unknown command", []string{"frobnicate"}, exitUsage},
		{"unknown flag", []string{"reduce", "--frob", s01}, exitUsage},
		{"bad flag value", []string{"reduce", s01, "--sample-mass", "5 parsecs", "--formula", "KNO3", "--heat-capacity", "442J/K"}, exitUsage},
		{"bad method", []string{"reduce", s01, "--sample-mass", "5g", "--formula", "KNO3", "--heat-capacity", "442J/K", "--method", "guess"}, exitUsage},
		{"unknown element", []string{"molar-mass", "Qq"}, exitUsage},
		{"two logs to reduce", []string{"reduce", s01, s01}, exitUsage},
		{"missing log", []string{"reduce", filepath.Join(dir, "nope.csv"), "--sample-mass", "5g", "--formula", "KNO3", "--heat-capacity", "442J/K"}, exitData},
		{"corrupt log", []string{"inspect", filepath.Join(td, "corrupt_cell.csv")}, exitData},
		{"corrupt calibration file", []string{"reduce", s01, "--sample-mass", "5g", "--formula", "KNO3", "--cal", badCal}, exitData},
		{"reduced", []string{"reduce", s01, "--sample-mass", "5.012g", "--formula", "KNO3", "--heat-capacity", "442±2J/K"}, exitOK},
		// KNO3 dissolves endothermically; calling it LiCl (exothermic, DOMAIN §5) fails the sign check.
		{"check failed", []string{"reduce", s01, "--sample-mass", "5.012g", "--formula", "LiCl", "--heat-capacity", "442±2J/K"}, exitCheckFail},
		{"periods given for two heating periods", []string{"calibrate", filepath.Join(td, "two_pulses.csv"), "--mix-time", "500s"}, exitUsage},
		{"ledger missing", []string{"ledger", "verify", filepath.Join(dir, "none.csv")}, exitData},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, _, stderr := runCLI(t, tc.args...)
			if code != tc.want {
				t.Errorf("exit %d, want %d; stderr:\n%s", code, tc.want, stderr)
			}
		})
	}
}
