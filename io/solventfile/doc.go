// Package solventfile reads user solvent files: CSV tables that add
// dispersants to the built-in solvent table of dlsbatch or override its
// entries.
//
// A solvent file is UTF-8 CSV with one header row; lines starting with "#"
// are comments and blank lines are skipped. Column names are
// case-insensitive and may come in any order; unknown columns are an error
// so that a misspelt column is not silently ignored.
//
//	name             required  name the entry is found by (case-insensitive)
//	aliases          optional  other names, separated by "|"
//	t_min_c, t_max_c required  temperature range in °C in which both laws hold
//	viscosity_model  required  constant | andrade | dippr101
//	viscosity_params required  numbers separated by spaces:
//	                             constant: η in mPa·s
//	                             andrade:  A B with ln(η/(mPa·s)) = A + B/(T/K)
//	                             dippr101: C1 … C5 with
//	                                       η/(Pa·s) = exp(C1 + C2/T + C3·ln T + C4·T^C5)
//	index_model      required  constant | cauchy
//	index_params     required  constant: n
//	                           cauchy:   A B [C …] with n = A + B/λ² + C/λ⁴ + …, λ in µm
//	index_t_c        optional  temperature in °C of the index data (needed with dn_dt_per_k)
//	dn_dt_per_k      optional  dn/dT in 1/K applied from index_t_c; blank = no correction
//	lambda_min_nm,   optional  vacuum-wavelength range of the index in nm; needed for
//	lambda_max_nm              cauchy, blank for constant = every wavelength
//	source           required  where the numbers come from (citation or lab record)
//
// The index is read as the absolute index at vacuum wavelength, the
// convention of dlsbatch; a handbook (relative to air) index should be
// multiplied by n_air ≈ 1.00027. Example:
//
//	name,aliases,t_min_c,t_max_c,viscosity_model,viscosity_params,index_model,index_params,index_t_c,dn_dt_per_k,lambda_min_nm,lambda_max_nm,source
//	buffer-a,pbs,15,40,andrade,-6.94 1990,constant,1.3345,25,-1.0e-4,,,lab notebook 12 p. 4
//
// Numbers are decimal as dls.ParseNumber reads them (25, -6.94, 1.0e-4; no
// hexadecimal, digit separators, inf or nan). Errors name the file, line
// and column (dls.PosError). Add each entry to a
// medium.Table with Load or with Parse and Entry.Solvent.
package solventfile
