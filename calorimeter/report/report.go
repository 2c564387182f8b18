// Package report writes the HTML report of a batch of reduced runs: a
// summary table with grades, then one section per run with its thermogram,
// result, checks and feedback — one self-contained file to hand back.
//
// Status colours come from the Okabe–Ito colour-blind-safe palette
// (Okabe & Ito, "Color Universal Design", 2008) and every status is also
// written as a word, so nothing depends on colour alone.
package report

import (
	"html/template"
	"io"
	"math"
	"strconv"
	"time"

	"calred/calorimeter"
)

// Entry is one run of the report.
type Entry struct {
	RunID, Kind, Status, Log string
	Result, Detail           string
	Error                    string
	Caution                  string
	Checks                   []calorimeter.Check
	Grade                    *calorimeter.Grade
	SVG                      string // the thermogram, drawn by package plot
}

// Report is the whole document.
type Report struct {
	Title, Manifest string
	Generated       time.Time
	Version         string
	Entries         []Entry
}

// Write renders r as one HTML document.
func Write(w io.Writer, r Report) error {
	return page.Execute(w, r)
}

func reportNum(v float64, digits int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	return strconv.FormatFloat(v, 'f', digits, 64)
}

var page = template.Must(template.New("report").Funcs(template.FuncMap{
	"svg": func(s string) template.HTML { return template.HTML(s) }, // drawn by our own plot package, not user text
	"num": reportNum,
	"utc": func(t time.Time) string { return t.Format("2006-01-02 15:04 UTC") },
	"notPassed": func(cs []calorimeter.Check) []calorimeter.Check {
		var out []calorimeter.Check
		for _, c := range cs {
			if c.Status != calorimeter.Pass {
				out = append(out, c)
			}
		}
		return out
	},
	"passed": func(cs []calorimeter.Check) []calorimeter.Check {
		var out []calorimeter.Check
		for _, c := range cs {
			if c.Status == calorimeter.Pass {
				out = append(out, c)
			}
		}
		return out
	},
}).Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>{{.Title}}</title>
<style>
 body { font-family: system-ui, sans-serif; margin: 2rem auto; max-width: 72rem; color: #1a1a1a; line-height: 1.4; padding: 0 1rem; }
 h1 { font-size: 1.5rem; border-bottom: 3px solid #0072B2; padding-bottom: .3rem; }
 h2 { font-size: 1.15rem; margin-top: 2.2rem; }
 table { border-collapse: collapse; width: 100%; font-size: .92rem; }
 th, td { text-align: left; padding: .3rem .5rem; border-bottom: 1px solid #ddd; vertical-align: top; }
 th { background: #f2f2f2; }
 td.n { text-align: right; font-variant-numeric: tabular-nums; }
 .tag { display: inline-block; padding: 0 .45rem; border-radius: .6rem; font-size: .82rem; font-weight: 600; color: #fff; }
 .pass { background: #0072B2; } .warn { background: #E69F00; color: #000; } .fail, .error { background: #D55E00; }
 .run { border: 1px solid #ccc; border-radius: .4rem; padding: .2rem 1rem 1rem; margin-top: 1.2rem; }
 .run svg { width: 100%; height: auto; }
 .caution { border-left: 4px solid #E69F00; padding: .3rem .7rem; background: #fff8e6; }
 .feedback li { margin: .2rem 0; }
 footer { margin-top: 3rem; font-size: .8rem; color: #555; }
</style>
</head>
<body>
<h1>{{.Title}}</h1>
<p>Manifest <code>{{.Manifest}}</code> · {{len .Entries}} runs · generated {{utc .Generated}} by calred {{.Version}}</p>
<p class="caution">Teaching coffee-cup results carry several per cent of uncertainty, and these checks do not replace a validated method.
Hot or caustic solutions and electrical heaters need eye protection, the substance's safety data sheet and your lab's local rules.</p>
<h2>Summary</h2>
<table>
<tr><th>run</th><th>kind</th><th>status</th><th>result</th><th>accepted</th><th>error %</th><th>z</th><th>ζ</th><th>En</th><th>verdict</th></tr>
{{range .Entries}}<tr><td><a href="#run-{{.RunID}}">{{.RunID}}</a></td><td>{{.Kind}}</td><td><span class="tag {{.Status}}">{{.Status}}</span></td>
<td>{{if .Error}}not reduced{{else}}{{.Result}}{{end}}</td>
{{with .Grade}}<td class="n">{{num .Accepted 2}}</td><td class="n">{{num .ErrorPercent 1}}</td><td class="n">{{num .Z 2}}</td><td class="n">{{num .Zeta 2}}</td><td class="n">{{num .En 2}}</td><td>{{.Verdict}}</td>{{else}}<td></td><td></td><td></td><td></td><td></td><td></td>{{end}}</tr>
{{end}}</table>
{{range .Entries}}
<section class="run" id="run-{{.RunID}}">
<h2>{{.RunID}} <span class="tag {{.Status}}">{{.Status}}</span></h2>
<p>{{.Kind}} run · log <code>{{.Log}}</code></p>
{{if .Error}}<p><strong>Could not be reduced:</strong> {{.Error}}</p>{{else}}
<p><strong>{{.Result}}</strong><br>{{.Detail}}</p>
{{if .SVG}}{{svg .SVG}}{{end}}
{{end}}
{{if .Caution}}<p class="caution">{{.Caution}}</p>{{end}}
{{with .Grade}}<p>Accepted {{num .Accepted 2}} kJ/mol: error {{num .ErrorPercent 1}} %, ζ = {{num .Zeta 2}}, En = {{num .En 2}} — <strong>{{.Verdict}}</strong>{{if .Basis}} (by {{.Basis}}){{end}}</p>
{{if .Feedback}}<ul class="feedback">{{range .Feedback}}<li>{{.}}</li>{{end}}</ul>{{end}}{{end}}
{{with notPassed .Checks}}<table><tr><th>check</th><th>status</th><th>detail</th></tr>
{{range .}}<tr><td>{{.Name}}</td><td><span class="tag {{.Status}}">{{.Status}}</span></td><td>{{.Detail}}</td></tr>{{end}}
</table>{{end}}
{{with passed .Checks}}<details><summary>{{len .}} checks passed</summary><table>
{{range .}}<tr><td>{{.Name}}</td><td><span class="tag {{.Status}}">{{.Status}}</span></td><td>{{.Detail}}</td></tr>{{end}}
</table></details>{{end}}
</section>
{{end}}
<footer>Scores per ISO 13528: |z|, |ζ| ≤ 2 satisfactory, 2–3 questionable, ≥ 3 unsatisfactory; |En| ≤ 1 satisfactory.
ΔsolH = −q/n with q = ε·ΔT the heat given to the calorimeter.</footer>
</body>
</html>
`))
