package reheat

import "math"

// Physical constants, each with its source.
const (
	// PlanckMassGeV is the (non-reduced) Planck mass sqrt(hbar c/G) in GeV,
	// 1.220890e19 (Particle Data Group, "Astrophysical constants"; value
	// from memory).
	PlanckMassGeV = 1.220890e19
	// BoltzmannEVPerK is k_B in eV/K, exact in the 2019 SI (CODATA 2018).
	BoltzmannEVPerK = 8.617333262e-5
	// HbarCGeVm is hbar c in GeV m (CODATA 2018).
	HbarCGeVm = 1.973269804e-16
	// MpcInM is one megaparsec in metres: 1 pc = 648000/pi au with the au
	// exact (IAU 2012 Resolution B2, IAU 2015 Resolution B2).
	MpcInM = 3.0856775814913673e22
	// DefaultT0K is the CMB temperature today, 2.7255 K (Fixsen 2009,
	// ApJ 707, 916, arXiv:0911.1955).
	DefaultT0K = 2.7255
	// DefaultGS0 is the entropy degrees of freedom today, 43/11: photons
	// plus three neutrino species at T_nu = (4/11)^(1/3) T (common practice,
	// standard thermal history).
	DefaultGS0 = 43.0 / 11.0
	// DefaultGReh is the effective number of relativistic degrees of
	// freedom of the full Standard Model, 106.75 (common practice).
	DefaultGReh = 106.75
	// DefaultAs is the scalar amplitude used to normalise the potential,
	// 2.1e-9 (Planck 2018 VI, arXiv:1807.06209: ln(10^10 A_s) = 3.044 ± 0.014
	// gives 2.099e-9).
	DefaultAs = 2.1e-9
	// DefaultPivotPerMpc is the scalar pivot k* = 0.05 Mpc^-1 (Planck 2018 X,
	// arXiv:1807.06211).
	DefaultPivotPerMpc = 0.05
)

// ReducedPlanckGeV is M_p = sqrt(hbar c/(8 pi G)) in GeV (about 2.4353e18).
var ReducedPlanckGeV = PlanckMassGeV / math.Sqrt(8*math.Pi)

// PerMpcInGeV is 1 Mpc^-1 expressed as an energy, hbar c / (1 Mpc), in GeV.
const PerMpcInGeV = HbarCGeVm / MpcInM

// KelvinInGeV converts a temperature in kelvin to GeV.
func KelvinInGeV(T float64) float64 { return T * BoltzmannEVPerK * 1e-9 }
