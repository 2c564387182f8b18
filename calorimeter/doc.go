// Package calorimeter reduces the temperature log of a solution calorimeter
// to a corrected temperature change, a heat and a molar enthalpy of solution
// with its uncertainty budget.
//
// # The measurement
//
// The vessel, of total heat capacity ε (the energy equivalent), exchanges
// heat with its surroundings by Newton's law outside the main period:
//
//	dθ/dt = u + G(θ_j − θ) = G(θ∞ − θ)
//
// so the drift is linear in θ. The process (dissolution, a heater pulse, the
// addition of hot water) adds a heat Q during the main period, and the
// quantity to recover is the adiabatic change ΔT_corr = Q/ε. AnalyseRise
// finds the fore, main and after periods, fits the drifts, computes every
// correction method (Regnault–Pfaundler, Dickinson's equal-area rule,
// extrapolation to the mixing time, a Newtonian model fitted by
// Levenberg–Marquardt), chooses one, and gives u(ΔT) from what the readings
// show; its doc comment has the rule and the formulas. Simulation makes
// synthetic thermograms with known truth for the tests and the demo.
//
// # Calibration and reduction
//
// CalibrateRun turns a calibration's ΔT into ε (electrical, a chemical
// standard, or hot/cold water mixing; see CalibrationRun.build for the
// models), Combine merges runs, and WriteCalibration/ReadCalibration keep
// them in a versioned file that re-derives ε from its inputs. ReduceSample
// builds one measurement model for the whole chain,
//
//	ΔsolH = −ε(x_cal)·ΔT_s·M/m_s
//
// so that an input used twice (the water c_p) enters once. Propagate applies
// the GUM law of propagation (JCGM 100:2008 eq. 13) with Richardson-
// extrapolated sensitivities, Welch–Satterthwaite ν_eff (G.2b), k =
// t_p(⌊ν_eff⌋) (G.4.1) and U = k·u_c; MonteCarlo and MonteCarloAdaptive
// propagate the distributions instead (JCGM 101:2008) and ValidateGUM
// compares the two 95 % intervals (JCGM 101:2008 §8). Monte Carlo runs are
// reproducible from their seed whatever the number of goroutines.
//
// # Substances
//
// MolarMass and ParseFormula read formulas with hydrates and adducts
// (CuSO4·5H2O, CaCl2.2H2O, K4[Fe(CN)6]·3H2O) over the IUPAC/CIAAW 2021
// standard atomic weights [Prohaska et al., Pure Appl. Chem. 94 (2022) 573],
// using the conventional values for interval elements, with standard
// uncertainties after van der Veen et al., Pure Appl. Chem. 93 (2021) 629:
//
//	u = (b − a)/(2√3)   interval [a, b]
//	u = U/√3            tabulated ± U
//
// Atoms of one element add linearly, elements in quadrature.
//
// Water at 0.1 MPa: WaterCp is a quintic fit to IAPWS-95 [Wagner & Pruß,
// J. Phys. Chem. Ref. Data 31 (2002) 387], 0–60 °C, within 9·10⁻⁵ J/(g·K);
// WaterEnthalpyChange is its exact integral; WaterDensity is Kell (1975) as
// given by Jones & Harris, J. Res. NIST 97 (1992) 335.
//
// Calibration standards (LookupStandard): KCl NIST SRM 1655 [Kilday, J. Res.
// NBS 85 (1980) 467], TRIS in HCl and in NaOH [Prosen & Kilday, J. Res. NBS
// 77A (1973) 581], and H⁺ + OH⁻ → H2O from CODATA key values with ΔrCp from
// Singh et al., Can. J. Chem. 54 (1976) 3315. EnthalpyAt corrects them to
// the run:
//
//	ΔH(T, m) = ΔH(T_ref, m_ref) + ΔCp·(T − T_ref) + φL(m) − φL(m_ref)
//
// with φL for KCl interpolated monotonically in √m. Values marked
// FromMemory were not checked against their source and must be verified
// before they are treated as certified. LookupReference holds accepted
// enthalpies of solution at infinite dilution (NBS tables, Parker 1965) for
// grading and sign checks; Caution gives a one-line safety note that defers
// to the safety data sheet, the lab's local rules and licensed practice.
//
// # Grading and control charts
//
// GradeResult scores a result against an accepted value as proficiency
// testing does (ISO 13528:2015: z, ζ, En), Diagnose names the classic
// mistakes, and AlgorithmA gives a robust class consensus. IndividualsChart
// builds an individuals (X) chart of a recorded quantity with σ = MR̄/1.128,
// centre the mean, limits ±2σ and ±3σ (NIST/SEMATECH e-Handbook of
// Statistical Methods §6.3.2), and flags four run rules: a point beyond 3σ;
// two of three beyond 2σ on one side; eight in a row on one side; six in a
// row steadily rising or falling. Each rule flags the point that completes
// its pattern.
//
// # Outside worlds
//
// Logs come from the sub-package logfile, which reads the delimited text
// exports of thermometers, data loggers and spreadsheets into elapsed
// seconds and kelvin, with the line of every reading for error messages.
// Every reduced run, failures included, can be recorded in the append-only,
// hash-chained CSV ledger of the sub-package ledger; plot draws thermograms
// and control charts, report the HTML report of a batch.
package calorimeter
