package main

import (
	"bytes"
	"encoding/json"
	"math"
	"testing"
	"time"
)

func TestFileNamePart(t *testing.T) {
	tests := []struct{ name, id, want string }{
		{"plain", "elcal-07", "elcal-07"},
		{"path", "../../evil", ".._.._evil"},
		{"windows", `a\b:c`, "a_b_c"},
		{"control", "a\nb", "a_b"},
		{"unicode kept", "Zoë-1", "Zoë-1"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := fileNamePart(tc.id); got != tc.want {
				t.Errorf("fileNamePart(%q) = %q, want %q", tc.id, got, tc.want)
			}
		})
	}
}

func TestNearField(t *testing.T) {
	tests := []struct{ name, key, want string }{
		{"hyphens dropped", "samplemass", "sample-mass"},
		{"one letter dropped", "formla", "formula"},
		{"two letters swapped in a long key", "sampel-mass", "sample-mass"},
		{"short key two edits away", "probe", ""}, // "pre" is two edits away; a probe is the log's business
		{"unrelated", "instrument", ""},
		{"short", "lab", ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := nearField(tc.key); got != tc.want {
				t.Errorf("nearField(%q) = %q, want %q", tc.key, got, tc.want)
			}
		})
	}
}

func TestEditDistance(t *testing.T) {
	tests := []struct {
		name, a, b string
		want       int
	}{
		{"equal", "mass", "mass", 0},
		{"empty", "", "abc", 3},
		{"kitten", "kitten", "sitting", 3}, // the textbook example (Levenshtein distance 3)
		{"swap", "ab", "ba", 2},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := editDistance(tc.a, tc.b); got != tc.want {
				t.Errorf("editDistance(%q, %q) = %d, want %d", tc.a, tc.b, got, tc.want)
			}
		})
	}
}

func TestManifestDelimiter(t *testing.T) {
	tests := []struct {
		name, text string
		want       rune
	}{
		{"comma", "log,kind\n", ','},
		{"semicolon with decimal commas below", "# c\nlog;kind;sample_mass\na.csv;sample;5,0 g\n", ';'},
		{"tab", "log\tkind\n", '\t'},
		{"quoted commas do not count", "\"a,b,c\";kind\n", ';'},
		{"one column", "log\n", ','},
		{"empty", "", ','},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := manifestDelimiter([]byte(tc.text)); got != tc.want {
				t.Errorf("manifestDelimiter(%q) = %q, want %q", tc.text, got, tc.want)
			}
		})
	}
}

func TestSplitHint(t *testing.T) {
	tests := []struct{ name, msg, rest, hint string }{
		{"none", "a: b", "a: b", ""},
		{"at the end", "no process found: 3 times its noise (hint: give the mixing time)", "no process found: 3 times its noise", "give the mixing time"},
		{"inside", "x (hint: y); z", "x; z", "y"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rest, hint := splitHint(tc.msg)
			if rest != tc.rest || hint != tc.hint {
				t.Errorf("splitHint(%q) = %q, %q; want %q, %q", tc.msg, rest, hint, tc.rest, tc.hint)
			}
		})
	}
}

func TestWriteJSONNonFinite(t *testing.T) {
	type inner struct {
		A float64 `json:"a"`
	}
	type embedded struct {
		E float64 `json:"e"`
	}
	type outer struct {
		embedded
		X     float64            `json:"x"`
		Skip  float64            `json:"-"`
		Omit  []int              `json:"omit,omitempty"`
		Nil   []int              `json:"nil"`
		Empty []int              `json:"empty"`
		In    inner              `json:"in"`
		M     map[string]float64 `json:"m"`
		P     *inner             `json:"p"`
		When  time.Time          `json:"when"`
		plain float64
	}
	nan, inf := math.NaN(), math.Inf(1)
	tests := []struct {
		name string
		v    any
		want string
	}{
		{"finite", 1.5, "1.5\n"},
		{"nan", nan, "null\n"},
		{"slice", []float64{1, nan, -inf}, "[1,null,null]\n"},
		{"struct in order", outer{embedded: embedded{E: nan}, X: 2, Skip: 3, Nil: nil, Empty: []int{}, In: inner{inf},
			M: map[string]float64{"b": nan, "a": 1}, When: time.Date(2026, 3, 4, 5, 6, 7, 0, time.UTC)},
			`{"e":null,"x":2,"nil":null,"empty":[],"in":{"a":null},"m":{"a":1,"b":null},"p":null,"when":"2026-03-04T05:06:07Z"}` + "\n"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var b bytes.Buffer
			if err := writeJSON(&b, tc.v); err != nil {
				t.Fatal(err)
			}
			var compact bytes.Buffer
			if err := json.Compact(&compact, b.Bytes()); err != nil {
				t.Fatal(err)
			}
			if got := compact.String() + "\n"; got != tc.want {
				t.Errorf("got %s want %s", got, tc.want)
			}
		})
	}
}
