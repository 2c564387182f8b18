// Package calorimeter reduces the temperature log of a solution calorimeter
// to a corrected temperature change, a heat and a molar enthalpy of solution
// with its uncertainty budget.
//
// The vessel, of total heat capacity ε (the energy equivalent), exchanges
// heat with its surroundings by Newton's law outside the main period:
//
//	dθ/dt = u + G(θ_j − θ) = G(θ∞ − θ)
//
// so the drift is linear in θ. The process (dissolution, a heater pulse, the
// addition of hot water) adds a heat Q during the main period, and the
// quantity to recover is the adiabatic change ΔT_corr = Q/ε. The methods,
// formulas and their sources are given beside the code that uses them.
package calorimeter
