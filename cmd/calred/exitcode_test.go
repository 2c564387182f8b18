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
	brokenQuote := filepath.Join(dir, "broken.csv")
	if err := os.WriteFile(brokenQuote, []byte("log,formula\n\"s01.csv,KNO3\n"), 0o644); err != nil {
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
		{"ledger is a directory", []string{"ledger", "verify", dir}, exitData},
		{"negative mass flag", []string{"reduce", s01, "--sample-mass", "-5g", "--formula", "KNO3", "--heat-capacity", "442J/K"}, exitUsage},
		{"zero heater power", []string{"calibrate", filepath.Join(td, "electrical_heater.csv"), "--heater-power", "0W", "--heater-time", "300s"}, exitUsage},
		{"mixing time beyond the log", []string{"reduce", s01, "--sample-mass", "5g", "--formula", "KNO3", "--heat-capacity", "442J/K", "--mix-time", "1e6"}, exitUsage},
		{"periods out of order", []string{"reduce", s01, "--sample-mass", "5g", "--formula", "KNO3", "--heat-capacity", "442J/K", "--pre", "0:170", "--post", "100:200"}, exitUsage},
		{"too few monte carlo trials", []string{"reduce", s01, "--sample-mass", "5g", "--formula", "KNO3", "--heat-capacity", "442J/K", "--monte-carlo", "1000"}, exitUsage},
		{"plot to a missing directory", []string{"reduce", s01, "--sample-mass", "5g", "--formula", "KNO3", "--heat-capacity", "442J/K", "--plot", filepath.Join(dir, "no", "x.svg")}, exitUsage},
		{"ledger flag names a directory", []string{"reduce", s01, "--sample-mass", "5g", "--formula", "KNO3", "--heat-capacity", "442J/K", "--ledger", dir}, exitUsage},
		{"same calibration log twice", []string{"calibrate", filepath.Join(ex, "cal-mix-1.csv"), filepath.Join(ex, "cal-mix-1.csv"), "--cold-mass", "50.12g", "--hot-mass", "49.87g", "--hot-temperature", "44.8C"}, exitUsage},
		{"manifest with a broken quote", []string{"batch", brokenQuote}, exitData},
		// mmss_timer.csv has a noiseless fore period: its lag-1 autocorrelation is NaN, written as null.
		{"json with an undetermined value", []string{"reduce", filepath.Join(td, "mmss_timer.csv"), "--sample-mass", "5g", "--formula", "NH4NO3", "--heat-capacity", "442J/K", "--json"}, exitCheckFail},
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
