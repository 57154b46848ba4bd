// Package thermal solves a device's junction temperature: the steady
// state of Tj = Ta + Rth·P(Tj) for a loss P that depends on Tj (Model),
// with its stability (the loop gain) and a runaway verdict when no steady
// state exists below the search limit. It takes the loss as a function of
// temperature and gives a Solution; it knows nothing of stages or parts.
package thermal
