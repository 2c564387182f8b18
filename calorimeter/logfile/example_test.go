package logfile_test

import (
	"fmt"
	"os"
	"strings"

	"calred/calorimeter/logfile"
)

func ExampleRead() {
	const export = `Corvane TK-20 Thermologger
Kestrel Analytical QC, bench 3
# operator: R. Okafor
# sample-mass: 2,503 g
Uhrzeit;Temperatur [°C];Heizleistung [W]
10:15:00;24,912;
10:15:10;24,914;
10:15:20;;
10:15:30;24,918;1,000
`
	l, err := logfile.Read(strings.NewReader(export), logfile.Options{Name: "run7.csv"})
	if err != nil {
		fmt.Println(err)
		return
	}
	d := l.Dialect
	fmt.Printf("delimiter %q, decimal %q, header on line %d after %d preamble lines\n", d.Delimiter, d.Decimal, d.HeaderLine, d.Preamble)
	fmt.Printf("time %s (%s), temperature in %s\n", d.TimeBase, d.TimeUnit, d.TemperatureUnit)
	fmt.Println("operator:", l.Meta["operator"], "| sample mass:", l.Meta["sample-mass"])
	for i := range l.Time {
		fmt.Printf("line %d: %2.0f s  %.3f K  %v W\n", l.Line[i], l.Time[i], l.Temperature[i], l.Extra["Heizleistung"][i])
	}
	for _, w := range l.Warnings {
		fmt.Println("warning:", w)
	}
	// Output:
	// delimiter ';', decimal ',', header on line 5 after 2 preamble lines
	// time clock (hh:mm:ss), temperature in C
	// operator: R. Okafor | sample mass: 2,503 g
	// line 6:  0 s  298.062 K  NaN W
	// line 7: 10 s  298.064 K  NaN W
	// line 9: 30 s  298.068 K  1 W
	// warning: run7.csv:8: blank temperature cell: reading skipped
}

func ExampleRead_error() {
	const export = "time (s),temperature (°C)\n0,21.50\n10,2x.1\n"
	_, err := logfile.Read(strings.NewReader(export), logfile.Options{Name: "run7.csv"})
	fmt.Println(err)
	// Output:
	// run7.csv:3: temperature "2x.1" is not a number
}

func ExampleSummary_WriteText() {
	const export = "# operator: P. Mbeki\nt (s)\tT (K)\n0\t298.1500\n2\t298.1502\n4\t298.1504\n16\t298.1510\n"
	l, err := logfile.Read(strings.NewReader(export), logfile.Options{Name: "cell-b.tsv"})
	if err != nil {
		fmt.Println(err)
		return
	}
	logfile.Summarise(l).WriteText(os.Stdout)
	// Output:
	// file              cell-b.tsv
	// format            tab-separated, decimal point, UTF-8
	// header            line 2, after 0 preamble lines
	// columns           1  t  s  time
	//                   2  T  K  temperature
	// time base         elapsed (s)
	// temperature unit  K
	// span              4 readings over 16 s
	// interval          2 s median, 2 s to 12 s
	// temperature       298.15 K to 298.151 K (25 °C to 25.001 °C)
	// gaps              after line 5: 4 s to 16 s (12 s)
	// repeated times    none
	// metadata          operator  P. Mbeki
	// warnings          none
}
