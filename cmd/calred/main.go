// Command calred reduces solution-calorimetry temperature logs to corrected
// temperature changes, heat capacities and molar enthalpies of solution with
// their uncertainty budgets, and keeps a hash-chained ledger of the results.
//
// Run `calred help` for the commands and `calred COMMAND --help` for flags.
package main

import "os"

func main() { os.Exit(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr)) }
