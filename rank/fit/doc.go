// Package fit prepares a validated library row (devices.Part) for
// evaluation: Prepare fits the laws of rank/loss to the datasheet values
// once per part (on-resistance against gate voltage and temperature,
// output capacitance, gate-charge curve, Miller law, recovery, threshold
// and diode coefficients, package parasitics) and gives a read-only
// Device. Every fallback it takes for a missing value is a Flag, with a
// short code and a sentence, never silent.
package fit
