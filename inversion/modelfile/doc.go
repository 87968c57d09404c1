// Package modelfile reads and writes tabulated planet models as CSV files.
//
// A model file has the header
//
//	radius_km,density_kg_m3,vp_km_s,vs_km_s
//
// optionally followed by a viscosity_pa_s column, and optionally (after that)
// by the two columns gravity_m_s2,pressure_pa that WriteProfileCSV adds; those
// two are checked to be numbers and otherwise ignored. Rows run from the centre
// (radius 0) to the surface, properties vary linearly between rows, and a
// discontinuity is two consecutive rows at the same radius (below, then above).
// Blank lines and lines starting with '#' are skipped; cells may carry
// surrounding spaces. Units are converted to SI on reading (km → m,
// km/s → m/s).
package modelfile
